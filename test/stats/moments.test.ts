import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { Moments } from "@leeway/stats";
import { MOMENTS_BLOCK } from "../../packages/stats/src/moments.js";
import { expectLeewayError, throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";
import { closeTo, twoPass } from "./brute-force.js";

// Scores far from the underflow range (squares of subnormal-scale numbers lose their digits).
const sample = fc.double({ min: -1e4, max: 1e4, noNaN: true, noDefaultInfinity: true }).filter((x) => x === 0 || Math.abs(x) > 1e-100);
const stream = (maxLength: number) => fc.array(sample, { minLength: 1, maxLength }).map((a) => Float64Array.from(a));

/** Largest |x|, the scale of rounding errors in a mean or variance. */
function scaleOf(xs: ArrayLike<number>): number {
  let s = 1e-300;
  for (let i = 0; i < xs.length; i++) s = Math.max(s, Math.abs(xs[i] as number));
  return s;
}

/** Mean agrees to a few ulps of the data scale; variance to 1e-10 relative or a few ulps of scale². */
function expectMomentsClose(mean: number, variance: number, ref: { mean: number; variance: number }, scale: number): void {
  expect(Math.abs(mean - ref.mean)).toBeLessThanOrEqual(1e-13 * scale);
  expect(Math.abs(variance - ref.variance)).toBeLessThanOrEqual(1e-10 * ref.variance + 1e-13 * scale * scale);
}

function oneByOne(xs: Float64Array, m = new Moments()): Moments {
  for (const x of xs) m.observe(x);
  return m;
}

describe("Moments", () => {
  it("observeMany reaches the same state as observe on each element, bit for bit", () => {
    fc.assert(
      fc.property(stream(1200), fc.integer({ min: 0, max: 700 }), (xs, cut) => {
        const a = oneByOne(xs);
        const b = new Moments();
        b.observeMany(xs.subarray(0, Math.min(cut, xs.length)));
        b.observeMany(xs.subarray(Math.min(cut, xs.length)));
        expect(b.snapshot()).toEqual(a.snapshot());
        expect(b.mean).toBe(a.mean);
        expect(b.variance).toBe(a.variance);
      }),
      { numRuns: 60 },
    );
  });

  it("mean, variance, min and max equal a two-pass computation from scratch", () => {
    fc.assert(
      fc.property(stream(2000), (xs) => {
        const m = new Moments();
        m.observeMany(xs);
        const ref = twoPass(xs);
        expect(m.count).toBe(xs.length);
        expectMomentsClose(m.mean, m.variance, ref, scaleOf(xs));
        expect(m.min).toBe(ref.min + 0); // −0 is kept as 0
        expect(m.max).toBe(ref.max + 0);
        if (xs.length > 1) expect(closeTo(m.sampleVariance * (xs.length - 1), ref.sampleVariance * (xs.length - 1), 1e-10, 1e-13 * scaleOf(xs) ** 2)).toBe(true);
      }),
      { numRuns: 60 },
    );
  });

  it("merge of two halves equals one pass", () => {
    fc.assert(
      fc.property(stream(1500), fc.double({ min: 0, max: 1, noNaN: true }), (xs, f) => {
        const cut = Math.floor(f * xs.length);
        const left = new Moments();
        left.observeMany(xs.subarray(0, cut));
        const right = new Moments();
        right.observeMany(xs.subarray(cut));
        const rightBefore = right.snapshot();
        left.merge(right);
        expect(right.snapshot()).toEqual(rightBefore);
        const whole = new Moments();
        whole.observeMany(xs);
        expect(left.count).toBe(whole.count);
        expect(left.weight).toBe(whole.weight);
        expectMomentsClose(left.mean, left.variance, whole, scaleOf(xs));
        expect(left.min).toBe(whole.min);
        expect(left.max).toBe(whole.max);
      }),
      { numRuns: 60 },
    );
  });

  it("snapshot/restore in the middle of a stream continues bit-identically", () => {
    fc.assert(
      fc.property(stream(900), stream(600), (head, tail) => {
        const a = new Moments();
        a.observeMany(head);
        const b = Moments.restore(throughJson(a.snapshot()));
        for (const x of tail) expect(b.observe(x)).toEqual(a.observe(x));
        expect(b.snapshot()).toEqual(a.snapshot());
      }),
      { numRuns: 40 },
    );
  });

  it("moments are shift and scale equivariant: mean(a·x + b) = a·mean + b, var(a·x + b) = a²·var", () => {
    fc.assert(
      fc.property(stream(800), fc.double({ min: -50, max: 50, noNaN: true }), fc.double({ min: -1e3, max: 1e3, noNaN: true }), (xs, a, b) => {
        fc.pre(Math.abs(a) > 1e-3);
        const m = new Moments();
        m.observeMany(xs);
        const t = new Moments();
        t.observeMany(xs.map((x) => a * x + b));
        const scale = Math.abs(a) * scaleOf(xs) + Math.abs(b);
        expectMomentsClose(t.mean, t.variance, { mean: a * m.mean + b, variance: a * a * m.variance }, scale);
      }),
      { numRuns: 60 },
    );
  });

  it("weight 1 on every sample gives the unweighted state bit for bit; integer weights equal repeated samples", () => {
    fc.assert(
      fc.property(fc.array(fc.tuple(sample, fc.integer({ min: 1, max: 5 })), { minLength: 1, maxLength: 300 }), (pairs) => {
        const xs = Float64Array.from(pairs.map((p) => p[0]));
        const ws = Float64Array.from(pairs.map((p) => p[1]));
        const ones = new Moments({ weighted: true });
        ones.observeMany(xs, new Float64Array(xs.length).fill(1));
        const plain = new Moments();
        plain.observeMany(xs);
        expect(ones.mean).toBe(plain.mean);
        expect(ones.variance).toBe(plain.variance);
        const weighted = new Moments({ weighted: true });
        weighted.observeMany(xs, ws);
        const repeated = pairs.flatMap(([x, w]) => Array.from({ length: w }, () => x));
        const ref = twoPass(repeated);
        expect(weighted.weight).toBe(repeated.length);
        expect(weighted.count).toBe(xs.length);
        expectMomentsClose(weighted.mean, weighted.variance, ref, scaleOf(xs));
        if (repeated.length > 1) expect(closeTo(weighted.sampleVariance * (repeated.length - 1), ref.sampleVariance * (repeated.length - 1), 1e-10, 1e-13 * scaleOf(xs) ** 2)).toBe(true);
      }),
      { numRuns: 50 },
    );
  });

  it("reports NaN before the first sample and a zero variance after one", () => {
    const m = new Moments();
    expect(m.count).toBe(0);
    expect(m.mean).toBeNaN();
    expect(m.variance).toBeNaN();
    expect(m.min).toBeNaN();
    expect(m.max).toBeNaN();
    expect(m.observe(3)).toEqual({ count: 1, mean: 3, variance: 0, skipped: 0 });
    expect(m.sampleVariance).toBeNaN();
    expect(m.std).toBe(0);
  });

  it("refuses non-finite samples by default, and skips and counts them under nonFinite: skip", () => {
    const m = new Moments();
    m.observe(1);
    expectLeewayError(() => m.observe(Number.NaN), "E_NON_FINITE", "x", "NaN");
    expectLeewayError(() => m.observe(-Infinity), "E_NON_FINITE", "-Infinity");
    expect(m.count).toBe(1);
    const xs = Float64Array.from({ length: 600 }, (_, i) => Math.sin(i));
    xs[400] = Infinity;
    const refusing = new Moments();
    expectLeewayError(() => refusing.observeMany(xs), "E_NON_FINITE", "Infinity");
    expect(refusing.snapshot()).toEqual(oneByOne(xs.subarray(0, 400)).snapshot());
    const skipping = new Moments({ nonFinite: "skip" });
    skipping.observeMany(xs);
    const reference = new Moments({ nonFinite: "skip" });
    for (const x of xs) reference.observe(x);
    expect(skipping.snapshot()).toEqual(reference.snapshot());
    expect(skipping.skipped).toBe(1);
    expect(skipping.count).toBe(599);
    expect(skipping.observe(Number.NaN).skipped).toBe(2);
    const w = new Moments({ weighted: true, nonFinite: "skip" });
    w.observe(1, Number.NaN);
    expect(w.skipped).toBe(1);
    expectLeewayError(() => new Moments({ weighted: true }).observe(1, Infinity), "E_NON_FINITE", "weight");
  });

  it("samples beyond |x| = 1e100 (whose squares could overflow) are refused with E_SAMPLE under either policy, in both paths", () => {
    const m = new Moments();
    expectLeewayError(() => m.observe(1e101), "E_SAMPLE", "x", "1e+100", "1e+101");
    expectLeewayError(() => m.observeMany(Float64Array.from([1, 2, -1e200])), "E_SAMPLE", "-1e+200");
    expect(m.count).toBe(2);
    m.observe(-1e100);
    expect(m.min).toBe(-1e100);
    const skip = new Moments({ nonFinite: "skip" });
    expectLeewayError(() => skip.observeMany(Float64Array.from([1, 1e300, 3])), "E_SAMPLE", "1e+300");
    expect(skip.skipped).toBe(0);
    expect(skip.mean).toBe(1);
    expectLeewayError(() => new Moments({ weighted: true, nonFinite: "skip" }).observe(1, 1e60), "E_SAMPLE", "weight", "1e+60");
  });

  it("refuses non-numbers with E_SAMPLE naming the parameter and the type, under skip too; batches must be Float64Arrays", () => {
    const skip = new Moments({ nonFinite: "skip" });
    expectLeewayError(() => skip.observe(null as never), "E_SAMPLE", "x", "null");
    expectLeewayError(() => skip.observe("5" as never), "E_SAMPLE", "x", "string");
    expectLeewayError(() => skip.observe([7] as never), "E_SAMPLE", "x", "array");
    expectLeewayError(() => skip.observe({} as never), "E_SAMPLE", "x", "object");
    expectLeewayError(() => skip.observeMany([1, 2] as never), "E_SAMPLE", "xs", "array");
    const weighted = new Moments({ weighted: true });
    expectLeewayError(() => weighted.observe(1, "2" as never), "E_SAMPLE", "weight", "string");
    expectLeewayError(() => weighted.observeMany(new Float64Array(2), [1, 1] as never), "E_SAMPLE", "weights", "array");
    expect(skip.count + weighted.count).toBe(0);
  });

  it("rejects each bad option and bad weight with E_OPTION naming it", () => {
    expectLeewayError(() => new Moments({ weighted: 1 as unknown as boolean }), "E_OPTION", "weighted", "1");
    expectLeewayError(() => new Moments({ nonFinite: "ignore" as "skip" }), "E_OPTION", "nonFinite", "ignore");
    expectLeewayError(() => new Moments({ width: 3 } as never), "E_OPTION", "width");
    expectLeewayError(() => new Moments(5 as never), "E_OPTION", "options");
    expectLeewayError(() => new Moments().observe(1, 2), "E_OPTION", "weight", "weighted");
    expectLeewayError(() => new Moments({ weighted: true }).observe(1, 0), "E_OPTION", "weight", "> 0");
    expectLeewayError(() => new Moments({ weighted: true }).observe(1, -2), "E_OPTION", "-2");
    expectLeewayError(() => new Moments().observeMany(new Float64Array(2), new Float64Array(2)), "E_OPTION", "weights");
    expectLeewayError(() => new Moments({ weighted: true }).observeMany(new Float64Array(2), new Float64Array(3)), "E_DIMENSION", "weights", "3");
  });

  it("refuses every corrupted snapshot", () => {
    const m = new Moments({ weighted: true });
    for (let i = 0; i < MOMENTS_BLOCK + 10; i++) m.observe(Math.cos(i), 1 + (i % 3));
    expectRefusesCorruptions((s) => Moments.restore(s), m.snapshot());
    expectRefusesCorruptions((s) => Moments.restore(s), new Moments().snapshot());
    const bad = throughJson(m.snapshot());
    bad.state.merged.weight = 0;
    expectLeewayError(() => Moments.restore(bad), "E_SNAPSHOT", "merged.weight");
    const unweighted = new Moments();
    unweighted.observeMany(Float64Array.from([1, 2, 3]));
    const badWeight = throughJson(unweighted.snapshot());
    badWeight.state.block.weight = 4;
    expectLeewayError(() => Moments.restore(badWeight), "E_SNAPSHOT", "block.weight");
    const swapped = throughJson(unweighted.snapshot());
    swapped.state.min = 5;
    expectLeewayError(() => Moments.restore(swapped), "E_SNAPSHOT", "min");
  });

  it("refuses a snapshot whose mean, spread, block sums or extremes lie beyond what samples within ±1e100 can give (regression: 1e308 was accepted and read NaN)", () => {
    const m = new Moments();
    for (let i = 0; i < 40; i++) m.observe(Math.sin(i));
    for (const [part, field, value] of [["merged", "mean", 1e308], ["merged", "m2", 1e250], ["block", "shift", -1e308], ["block", "sum", 1e200], ["block", "sumSquares", 1e300], [null, "min", -1e101], [null, "max", 1e308]] as const) {
      const bad = throughJson(m.snapshot()) as unknown as { state: Record<string, Record<string, number> | number> };
      if (part === null) bad.state[field] = value;
      else (bad.state[part] as Record<string, number>)[field] = value;
      expectLeewayError(() => Moments.restore(bad), "E_SNAPSHOT", field, "1e+100");
    }
    const edge = new Moments();
    for (let i = 0; i < 300; i++) edge.observe(i % 2 === 0 ? 1e100 : -1e100);
    expect(Moments.restore(throughJson(edge.snapshot())).observe(0)).toEqual(edge.observe(0));
  });
});
