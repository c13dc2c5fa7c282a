import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { WindowMoments } from "@leeway/stats";
import { expectLeewayError, throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";
import { twoPass } from "./brute-force.js";

// Integers make ties (and repeated minima / maxima) common; doubles cover the rest.
const sample = fc.oneof(fc.integer({ min: -5, max: 5 }), fc.double({ min: -1e4, max: 1e4, noNaN: true }).filter((x) => x === 0 || Math.abs(x) > 1e-100));
const stream = (maxLength: number) => fc.array(sample, { minLength: 1, maxLength }).map((a) => Float64Array.from(a));
const width = fc.integer({ min: 1, max: 40 });

/** The window agrees with a two-pass recomputation, to the stated bound W·ε·R² (R: range of the last 2W samples). */
function expectMatchesLastW(w: WindowMoments, xs: Float64Array): void {
  const last = xs.subarray(Math.max(0, xs.length - w.width));
  const ref = twoPass(last);
  const recent = twoPass(xs.subarray(Math.max(0, xs.length - 2 * w.width)));
  const range = recent.max - recent.min;
  const scale = Math.max(1e-300, ...Array.from(last, Math.abs));
  expect(w.size).toBe(last.length);
  expect(Array.from(w.values())).toEqual(Array.from(last, (x) => x + 0));
  expect(w.min).toBe(ref.min + 0);
  expect(w.max).toBe(ref.max + 0);
  expect(Math.abs(w.mean - ref.mean)).toBeLessThanOrEqual(1e-13 * (scale + range));
  expect(Math.abs(w.variance - ref.variance)).toBeLessThanOrEqual(1e-12 * ref.variance + w.width * 2 ** -53 * range * range);
}

describe("WindowMoments", () => {
  it("window results equal a recomputation from scratch over the last W samples, at every step", () => {
    fc.assert(
      fc.property(stream(200), width, (xs, wd) => {
        const w = new WindowMoments({ width: wd });
        for (let i = 0; i < xs.length; i++) {
          const r = w.observe(xs[i] as number);
          const seen = xs.subarray(0, i + 1);
          expectMatchesLastW(w, seen);
          expect(r).toEqual({ count: i + 1, size: w.size, mean: w.mean, variance: w.variance, min: w.min, max: w.max, skipped: 0 });
        }
      }),
      { numRuns: 60 },
    );
  });

  it("observeMany reaches the same state as observe on each element, bit for bit", () => {
    fc.assert(
      fc.property(stream(400), width, (xs, wd) => {
        const a = new WindowMoments({ width: wd });
        for (const x of xs) a.observe(x);
        const b = new WindowMoments({ width: wd });
        b.observeMany(xs);
        expect(b.snapshot()).toEqual(a.snapshot());
        expect(b.min).toBe(a.min);
        expect(b.max).toBe(a.max);
      }),
      { numRuns: 60 },
    );
  });

  it("snapshot/restore in the middle of a stream continues bit-identically", () => {
    fc.assert(
      fc.property(stream(300), stream(150), width, (head, tail, wd) => {
        const a = new WindowMoments({ width: wd });
        a.observeMany(head);
        const b = WindowMoments.restore(throughJson(a.snapshot()));
        for (const x of tail) expect(b.observe(x)).toEqual(a.observe(x));
        expect(b.snapshot()).toEqual(a.snapshot());
      }),
      { numRuns: 60 },
    );
  });

  it("moments are shift and scale equivariant over the window", () => {
    fc.assert(
      fc.property(stream(200), width, fc.double({ min: -50, max: 50, noNaN: true }), fc.double({ min: -1e3, max: 1e3, noNaN: true }), (xs, wd, a, b) => {
        fc.pre(Math.abs(a) > 1e-3);
        const m = new WindowMoments({ width: wd });
        m.observeMany(xs);
        const t = new WindowMoments({ width: wd });
        t.observeMany(xs.map((x) => a * x + b));
        const scale = Math.abs(a) * Math.max(1, ...Array.from(xs, Math.abs)) + Math.abs(b);
        expect(Math.abs(t.mean - (a * m.mean + b))).toBeLessThanOrEqual(1e-12 * scale);
        expect(Math.abs(t.variance - a * a * m.variance)).toBeLessThanOrEqual(1e-9 * a * a * m.variance + 1e-11 * scale * scale);
      }),
      { numRuns: 60 },
    );
  });

  it("stays accurate over 10^7 samples with a large offset and level jumps (no drift of the running sums)", () => {
    const r = new RandomSource("window-drift");
    const n = 10_000_000;
    const xs = new Float64Array(n);
    let level = 1e6;
    for (let i = 0; i < n; i++) {
      if (i % 250_000 === 0) level = 1e6 + r.uniform(-1e5, 1e5);
      xs[i] = level + r.uniform(-1, 1);
    }
    const w = new WindowMoments({ width: 1000 });
    for (let i = 0; i < n; i += 1 << 16) w.observeMany(xs.subarray(i, Math.min(n, i + (1 << 16))));
    const ref = twoPass(xs.subarray(n - 1000));
    expect(w.count).toBe(n);
    expect(Math.abs(w.mean - ref.mean) / Math.abs(ref.mean)).toBeLessThan(1e-14);
    expect(Math.abs(w.variance - ref.variance) / ref.variance).toBeLessThan(1e-7);
    expect(w.min).toBe(ref.min);
    expect(w.max).toBe(ref.max);
  });

  it("refuses non-finite samples by default, and skips and counts them under nonFinite: skip", () => {
    const w = new WindowMoments({ width: 3 });
    expect(w.mean).toBeNaN();
    expect(w.min).toBeNaN();
    expect(w.sampleVariance).toBeNaN();
    w.observe(1);
    expectLeewayError(() => w.observe(Number.NaN), "E_NON_FINITE", "x", "NaN");
    expectLeewayError(() => w.observeMany(Float64Array.from([2, -Infinity, 3])), "E_NON_FINITE", "-Infinity");
    expect(Array.from(w.values())).toEqual([1, 2]);
    const skip = new WindowMoments({ width: 3, nonFinite: "skip" });
    skip.observeMany(Float64Array.from([1, Number.NaN, 2, 3, Infinity, 4]));
    expect(Array.from(skip.values())).toEqual([2, 3, 4]);
    expect(skip.skipped).toBe(2);
    expect(skip.count).toBe(4);
    expect(skip.sampleVariance).toBe(1);
  });

  it("samples beyond |x| = 1e100 are refused with E_SAMPLE under either policy, in both paths, and the state is kept", () => {
    const a = new WindowMoments({ width: 4 });
    expectLeewayError(() => a.observe(-1e101), "E_SAMPLE", "x", "1e+100", "-1e+101");
    expectLeewayError(() => a.observeMany(Float64Array.from([1, 1e200])), "E_SAMPLE", "1e+200");
    expect(a.count).toBe(1);
    const skip = new WindowMoments({ ...{ width: 4 }, nonFinite: "skip" });
    expectLeewayError(() => skip.observeMany(Float64Array.from([1, 1e300, 3])), "E_SAMPLE", "1e+300");
    expect(skip.skipped).toBe(0);
    expect(skip.count).toBe(1);
  });

  it("refuses non-numbers with E_SAMPLE naming x and the type, under skip too; a batch must be a Float64Array", () => {
    const skip = new WindowMoments({ ...{ width: 4 }, nonFinite: "skip" });
    expectLeewayError(() => skip.observe(null as never), "E_SAMPLE", "x", "null");
    expectLeewayError(() => skip.observe("5" as never), "E_SAMPLE", "x", "string");
    expectLeewayError(() => skip.observe([7] as never), "E_SAMPLE", "x", "array");
    expectLeewayError(() => skip.observe({} as never), "E_SAMPLE", "x", "object");
    expectLeewayError(() => skip.observeMany([1, 2] as never), "E_SAMPLE", "xs", "array");
    expect(skip.count).toBe(0);
    expect(skip.skipped).toBe(0);
  });

  it("rejects each bad option with E_OPTION naming it", () => {
    expectLeewayError(() => new WindowMoments({ width: 0 }), "E_OPTION", "width", "0");
    expectLeewayError(() => new WindowMoments({ width: 2.5 }), "E_OPTION", "width", "2.5");
    expectLeewayError(() => new WindowMoments({ width: 1e9 }), "E_OPTION", "width");
    expectLeewayError(() => new WindowMoments({} as never), "E_OPTION", "width", "undefined");
    expectLeewayError(() => new WindowMoments({ width: 3, nonFinite: 1 as never }), "E_OPTION", "nonFinite");
    expectLeewayError(() => new WindowMoments({ width: 3, halfLife: 3 } as never), "E_OPTION", "halfLife");
  });

  it("refuses every corrupted snapshot", () => {
    const w = new WindowMoments({ width: 8 });
    w.observeMany(Float64Array.from({ length: 21 }, (_, i) => Math.cos(i)));
    expectRefusesCorruptions((s) => WindowMoments.restore(s), w.snapshot(), { sizePaths: [["width"]] });
    const part = new WindowMoments({ width: 8 });
    part.observeMany(Float64Array.from([1, 2, 3]));
    expectRefusesCorruptions((s) => WindowMoments.restore(s), part.snapshot(), { sizePaths: [["width"]] });
    expectRefusesCorruptions((s) => WindowMoments.restore(s), new WindowMoments({ width: 4 }).snapshot(), { sizePaths: [["width"]] });
    const lying = throughJson(part.snapshot());
    lying.state.count = 5;
    expectLeewayError(() => WindowMoments.restore(lying), "E_SNAPSHOT", "window", "length 5");
  });

  it("refuses a snapshot whose window values, shift or sums lie beyond what samples within ±1e100 can give (regression: a window value of 1e308 was accepted and read NaN)", () => {
    const w = new WindowMoments({ width: 6 });
    for (let i = 0; i < 20; i++) w.observe(Math.sin(i));
    const damage: [string, (s: { state: Record<string, unknown> }) => void][] = [
      ["window[1]", (s) => ((s.state.window as number[])[1] = 1e308)],
      ["shift", (s) => (s.state.shift = -1e308)],
      ["sum", (s) => (s.state.sum = 1e200)],
      ["sumSquares", (s) => (s.state.sumSquares = 1e300)],
    ];
    for (const [field, apply] of damage) {
      const bad = throughJson(w.snapshot()) as unknown as { state: Record<string, unknown> };
      apply(bad);
      expectLeewayError(() => WindowMoments.restore(bad), "E_SNAPSHOT", field);
    }
    const edge = new WindowMoments({ width: 6 });
    for (let i = 0; i < 50; i++) edge.observe(i % 2 === 0 ? 1e100 : -1e100);
    expect(WindowMoments.restore(throughJson(edge.snapshot())).observe(0)).toEqual(edge.observe(0));
  });
});
