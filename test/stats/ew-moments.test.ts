import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { EwMoments } from "@leeway/stats";
import { expectLeewayError, throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";

const sample = fc.double({ min: -1e4, max: 1e4, noNaN: true, noDefaultInfinity: true });
const stream = (maxLength: number) => fc.array(sample, { minLength: 1, maxLength }).map((a) => Float64Array.from(a));
const alpha = fc.double({ min: 1e-4, max: 1, noNaN: true });

/** Σ λ^(t−i) x_i / Σ λ^(t−i) and the matching weighted variance, straight from the definition. */
function weightedDirect(xs: Float64Array, a: number): { mean: number; variance: number } {
  const lambda = 1 - a;
  const n = xs.length;
  let w = 0;
  let sum = 0;
  for (let i = 0; i < n; i++) {
    const wi = lambda ** (n - 1 - i);
    w += wi;
    sum += wi * (xs[i] as number);
  }
  const mean = sum / w;
  let ss = 0;
  for (let i = 0; i < n; i++) ss += lambda ** (n - 1 - i) * ((xs[i] as number) - mean) ** 2;
  return { mean, variance: ss / w };
}

describe("EwMoments", () => {
  it("observeMany reaches the same state as observe on each element, bit for bit", () => {
    fc.assert(
      fc.property(stream(500), alpha, (xs, a) => {
        const one = new EwMoments({ alpha: a });
        for (const x of xs) one.observe(x);
        const many = new EwMoments({ alpha: a });
        many.observeMany(xs);
        expect(many.snapshot()).toEqual(one.snapshot());
      }),
      { numRuns: 80 },
    );
  });

  it("observeMany's converged fast path (W at its fixed point) stays bit-identical to observe, across non-finite skips", () => {
    const xs = Float64Array.from({ length: 3000 }, (_, i) => Math.sin(i * 0.37) * 5 + (i % 11));
    xs[2500] = Number.NaN;
    for (const alpha of [0.3, 0.05]) {
      const one = new EwMoments({ alpha, nonFinite: "skip" });
      for (const x of xs) one.observe(x);
      const many = new EwMoments({ alpha, nonFinite: "skip" });
      many.observeMany(xs.subarray(0, 1234));
      many.observeMany(xs.subarray(1234));
      expect(many.snapshot()).toEqual(one.snapshot());
      expect(many.skipped).toBe(1);
    }
  });

  it("mean and variance equal the exponentially weighted moments computed from their definition (bias-free warm-up)", () => {
    fc.assert(
      fc.property(stream(300), fc.double({ min: 0.01, max: 1, noNaN: true }), (xs, a) => {
        const ew = new EwMoments({ alpha: a });
        ew.observeMany(xs);
        const ref = weightedDirect(xs, a);
        const scale = Math.max(1, ...Array.from(xs, Math.abs));
        expect(Math.abs(ew.mean - ref.mean)).toBeLessThanOrEqual(1e-11 * scale);
        expect(Math.abs(ew.variance - ref.variance)).toBeLessThanOrEqual(1e-9 * ref.variance + 1e-11 * scale * scale);
      }),
      { numRuns: 80 },
    );
  });

  it("converges to the classical EWMA recursion m ← m + α(x − m) once warmed up", () => {
    const ew = new EwMoments({ halfLife: 20 });
    let classic = 0;
    const a = ew.alpha;
    for (let i = 0; i < 5000; i++) {
      const x = Math.sin(i / 7) + 3;
      ew.observe(x);
      classic = i === 0 ? x : classic + a * (x - classic);
    }
    expect(Math.abs(ew.mean - classic)).toBeLessThan(1e-9);
  });

  it("halfLife h gives α = 1 − 2^(−1/h): a sample's weight halves after h samples", () => {
    fc.assert(
      fc.property(fc.double({ min: 0.5, max: 1e5, noNaN: true }), (h) => {
        const ew = new EwMoments({ halfLife: h });
        expect(Math.abs((1 - ew.alpha) ** h - 0.5)).toBeLessThan(1e-12 + 1e-15 * h); // 1 − α itself rounds
        expect(Math.abs(ew.halfLife - h)).toBeLessThanOrEqual(1e-9 * h);
      }),
    );
    expect(new EwMoments({ alpha: 1 }).halfLife).toBe(0);
  });

  it("is shift and scale equivariant: mean(a·x + b) = a·mean + b, var(a·x + b) = a²·var", () => {
    fc.assert(
      fc.property(stream(300), alpha, fc.double({ min: -50, max: 50, noNaN: true }), fc.double({ min: -1e3, max: 1e3, noNaN: true }), (xs, al, a, b) => {
        fc.pre(Math.abs(a) > 1e-3);
        const m = new EwMoments({ alpha: al });
        m.observeMany(xs);
        const t = new EwMoments({ alpha: al });
        t.observeMany(xs.map((x) => a * x + b));
        const scale = Math.abs(a) * Math.max(1, ...Array.from(xs, Math.abs)) + Math.abs(b);
        expect(Math.abs(t.mean - (a * m.mean + b))).toBeLessThanOrEqual(1e-12 * scale);
        expect(Math.abs(t.variance - a * a * m.variance)).toBeLessThanOrEqual(1e-9 * a * a * m.variance + 1e-11 * scale * scale);
      }),
      { numRuns: 60 },
    );
  });

  it("snapshot/restore in the middle of a stream continues bit-identically", () => {
    fc.assert(
      fc.property(stream(300), stream(200), alpha, (head, tail, a) => {
        const x = new EwMoments({ alpha: a });
        x.observeMany(head);
        const y = EwMoments.restore(throughJson(x.snapshot()));
        for (const v of tail) expect(y.observe(v)).toEqual(x.observe(v));
        expect(y.snapshot()).toEqual(x.snapshot());
      }),
      { numRuns: 40 },
    );
  });

  it("refuses non-finite samples by default, and skips and counts them under nonFinite: skip", () => {
    const ew = new EwMoments({ alpha: 0.1 });
    expect(ew.mean).toBeNaN();
    expect(ew.variance).toBeNaN();
    expectLeewayError(() => ew.observe(Number.NaN), "E_NON_FINITE", "x", "NaN");
    const xs = Float64Array.from([1, 2, Infinity, 4]);
    expectLeewayError(() => ew.observeMany(xs), "E_NON_FINITE", "Infinity");
    expect(ew.count).toBe(2);
    const skip = new EwMoments({ alpha: 0.1, nonFinite: "skip" });
    skip.observeMany(xs);
    const ref = new EwMoments({ alpha: 0.1, nonFinite: "skip" });
    for (const x of [1, 2, 4]) ref.observe(x);
    expect(skip.mean).toBe(ref.mean);
    expect(skip.skipped).toBe(1);
    expect(skip.count).toBe(3);
  });

  it("samples beyond |x| = 1e100 are refused with E_SAMPLE under either policy, in both paths, and the state is kept", () => {
    const a = new EwMoments({ alpha: 0.5 });
    expectLeewayError(() => a.observe(-1e101), "E_SAMPLE", "x", "1e+100", "-1e+101");
    expectLeewayError(() => a.observeMany(Float64Array.from([1, 1e200])), "E_SAMPLE", "1e+200");
    expect(a.count).toBe(1);
    const skip = new EwMoments({ ...{ alpha: 0.5 }, nonFinite: "skip" });
    expectLeewayError(() => skip.observeMany(Float64Array.from([1, 1e300, 3])), "E_SAMPLE", "1e+300");
    expect(skip.skipped).toBe(0);
    expect(skip.count).toBe(1);
  });

  it("refuses non-numbers with E_SAMPLE naming x and the type, under skip too; a batch must be a Float64Array", () => {
    const skip = new EwMoments({ ...{ alpha: 0.5 }, nonFinite: "skip" });
    expectLeewayError(() => skip.observe(null as never), "E_SAMPLE", "x", "null");
    expectLeewayError(() => skip.observe("5" as never), "E_SAMPLE", "x", "string");
    expectLeewayError(() => skip.observe([7] as never), "E_SAMPLE", "x", "array");
    expectLeewayError(() => skip.observe({} as never), "E_SAMPLE", "x", "object");
    expectLeewayError(() => skip.observeMany([1, 2] as never), "E_SAMPLE", "xs", "array");
    expect(skip.count).toBe(0);
    expect(skip.skipped).toBe(0);
  });

  it("rejects each bad option with E_OPTION naming it", () => {
    expectLeewayError(() => new EwMoments({}), "E_OPTION", "halfLife", "alpha");
    expectLeewayError(() => new EwMoments({ halfLife: 3, alpha: 0.2 }), "E_OPTION", "exactly one");
    expectLeewayError(() => new EwMoments({ halfLife: 0 }), "E_OPTION", "halfLife", "> 0");
    expectLeewayError(() => new EwMoments({ halfLife: Number.NaN }), "E_OPTION", "halfLife", "NaN");
    expectLeewayError(() => new EwMoments({ alpha: 0 }), "E_OPTION", "alpha", "(0, 1]");
    expectLeewayError(() => new EwMoments({ alpha: 1.5 }), "E_OPTION", "alpha", "1.5");
    expectLeewayError(() => new EwMoments({ alpha: 0.1, nonFinite: "drop" as "skip" }), "E_OPTION", "nonFinite");
    expectLeewayError(() => new EwMoments({ alpha: 0.1, span: 3 } as never), "E_OPTION", "span");
  });

  it("refuses every corrupted snapshot", () => {
    const ew = new EwMoments({ halfLife: 5 });
    ew.observeMany(Float64Array.from({ length: 40 }, (_, i) => Math.cos(i)));
    expectRefusesCorruptions((s) => EwMoments.restore(s), ew.snapshot());
    expectRefusesCorruptions((s) => EwMoments.restore(s), new EwMoments({ alpha: 0.5 }).snapshot());
    const bad = throughJson(ew.snapshot());
    bad.state.weight = 0.5;
    expectLeewayError(() => EwMoments.restore(bad), "E_SNAPSHOT", "weight");
    const wide = throughJson(ew.snapshot());
    wide.state.weight = 1e6;
    expectLeewayError(() => EwMoments.restore(wide), "E_SNAPSHOT", "weight");
    const a = throughJson(ew.snapshot());
    a.state.alpha = 0;
    expectLeewayError(() => EwMoments.restore(a), "E_SNAPSHOT", "alpha");
  });

  it("refuses a snapshot whose mean or spread lies beyond what samples within ±1e100 can give (regression: a mean of 1e308 was accepted and read an infinite variance)", () => {
    const ew = new EwMoments({ halfLife: 5 });
    for (let i = 0; i < 40; i++) ew.observe(Math.sin(i));
    for (const [field, value] of [["mean", 1e308], ["mean", -1e101], ["s", 1e300]] as const) {
      const bad = throughJson(ew.snapshot()) as unknown as { state: Record<string, number> };
      bad.state[field] = value;
      expectLeewayError(() => EwMoments.restore(bad), "E_SNAPSHOT", `state.${field}`);
    }
    const edge = new EwMoments({ halfLife: 5 });
    for (let i = 0; i < 100; i++) edge.observe(i % 2 === 0 ? 1e100 : -1e100);
    expect(EwMoments.restore(throughJson(edge.snapshot())).observe(0)).toEqual(edge.observe(0));
  });
});
