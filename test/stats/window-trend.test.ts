import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { WindowTrend, mannKendall } from "@leeway/stats";
import { mannKendallZ } from "../../packages/stats/src/mann-kendall.js";
import { expectLeewayError, throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";
import { mannKendallBrute } from "./brute-force.js";

// Few distinct values make tie groups common, which is what the tie correction is about.
const sample = fc.oneof(fc.integer({ min: 0, max: 6 }), fc.double({ min: -100, max: 100, noNaN: true }));
const stream = (maxLength: number) => fc.array(sample, { minLength: 1, maxLength }).map((a) => Float64Array.from(a));
const width = fc.integer({ min: 2, max: 30 });

/** Median of all pairwise slopes, by sorting. */
function theilSenBrute(xs: ArrayLike<number>): number {
  const slopes: number[] = [];
  for (let i = 0; i < xs.length; i++) for (let j = i + 1; j < xs.length; j++) slopes.push(((xs[j] as number) - (xs[i] as number)) / (j - i));
  slopes.sort((a, b) => a - b);
  const m = slopes.length;
  return m % 2 === 1 ? (slopes[(m - 1) / 2] as number) : ((slopes[m / 2 - 1] as number) + (slopes[m / 2] as number)) / 2;
}

describe("WindowTrend", () => {
  it("Mann-Kendall S and its tie-corrected variance equal brute force over the last W samples, at every step", () => {
    fc.assert(
      fc.property(stream(120), width, (xs, wd) => {
        const t = new WindowTrend({ width: wd });
        for (let i = 0; i < xs.length; i++) {
          const r = t.observe(xs[i] as number);
          const last = xs.subarray(Math.max(0, i + 1 - wd), i + 1);
          const ref = mannKendallBrute(last);
          expect(r.s).toBe(ref.s);
          expect(r.size).toBe(last.length);
          expect(r.variance).toBe(last.length < 2 ? 0 : ref.variance);
          expect({ z: r.z, pValue: r.pValue }).toEqual(mannKendallZ(ref.s, r.variance));
        }
      }),
      { numRuns: 80 },
    );
  });

  it("z carries the continuity correction and the p-value is two-sided", () => {
    expect(mannKendallZ(0, 10)).toEqual({ z: 0, pValue: 1 });
    expect(mannKendallZ(5, 0)).toEqual({ z: 0, pValue: 1 });
    expect(mannKendallZ(5, 16).z).toBe(1);
    expect(mannKendallZ(-5, 16).z).toBe(-1);
    // 2·P(Z > 1) = 0.3173105078629141 (the normal two-sided tail at 1σ; common practice, no source).
    expect(mannKendallZ(5, 16).pValue).toBeCloseTo(0.3173105078629141, 13);
    expect(mannKendallZ(-5, 16).pValue).toBe(mannKendallZ(5, 16).pValue);
  });

  it("slope() equals the median of all pairwise slopes over the window", () => {
    fc.assert(
      fc.property(stream(80), width, (xs, wd) => {
        const t = new WindowTrend({ width: wd });
        t.observeMany(xs);
        const last = xs.subarray(Math.max(0, xs.length - wd));
        if (last.length < 2) expect(t.slope()).toBeNaN();
        else expect(t.slope()).toBeCloseTo(theilSenBrute(last), 12);
      }),
      { numRuns: 80 },
    );
  });

  it("the batch mannKendall equals the window over the whole series", () => {
    fc.assert(
      fc.property(stream(60), (xs) => {
        const t = new WindowTrend({ width: Math.max(2, xs.length) });
        t.observeMany(xs);
        const batch = mannKendall(xs);
        expect(batch.s).toBe(t.s);
        expect(batch.variance).toBe(t.variance);
        expect(batch.z).toBe(t.z);
        expect(batch.pValue).toBe(t.pValue);
      }),
      { numRuns: 60 },
    );
  });

  it("observeMany reaches the same state as observe on each element, and snapshot/restore continues bit-identically", () => {
    fc.assert(
      fc.property(stream(150), stream(80), width, (head, tail, wd) => {
        const a = new WindowTrend({ width: wd });
        for (const x of head) a.observe(x);
        const b = new WindowTrend({ width: wd });
        b.observeMany(head);
        expect(b.snapshot()).toEqual(a.snapshot());
        const c = WindowTrend.restore(throughJson(a.snapshot()));
        for (const x of tail) expect(c.observe(x)).toEqual(a.observe(x));
        expect(c.snapshot()).toEqual(a.snapshot());
        expect(c.slope()).toBe(a.slope());
      }),
      { numRuns: 60 },
    );
  });

  it("S is invariant to an increasing rescaling and flips sign under negation", () => {
    fc.assert(
      fc.property(stream(60), width, (xs, wd) => {
        const a = new WindowTrend({ width: wd });
        a.observeMany(xs);
        const b = new WindowTrend({ width: wd });
        b.observeMany(xs.map((x) => 4 * x)); // exact in binary floating point, so strictly increasing
        const c = new WindowTrend({ width: wd });
        c.observeMany(xs.map((x) => -x));
        expect(b.s).toBe(a.s);
        expect(b.variance).toBe(a.variance);
        expect(c.s + a.s).toBe(0);
      }),
      { numRuns: 60 },
    );
  });

  it("refuses non-finite samples by default, and skips and counts them under nonFinite: skip", () => {
    const t = new WindowTrend({ width: 4 });
    expect(t.z).toBe(0);
    expect(t.pValue).toBe(1);
    expectLeewayError(() => t.observe(Number.NaN), "E_NON_FINITE", "x", "NaN");
    const skip = new WindowTrend({ width: 4, nonFinite: "skip" });
    skip.observeMany(Float64Array.from([1, Infinity, 2, 3]));
    expect(skip.observe(Number.NaN)).toMatchObject({ count: 3, size: 3, s: 3, skipped: 2 });
  });

  it("rejects each bad option with E_OPTION naming it", () => {
    expectLeewayError(() => new WindowTrend({ width: 1 }), "E_OPTION", "width", "[2, 4096]");
    expectLeewayError(() => new WindowTrend({ width: 5000 }), "E_OPTION", "width", "5000");
    expectLeewayError(() => new WindowTrend({ width: "8" as never }), "E_OPTION", "width");
    expectLeewayError(() => new WindowTrend({ width: 8, nonFinite: "keep" as never }), "E_OPTION", "nonFinite");
    expectLeewayError(() => new WindowTrend({ width: 8, alpha: 0.05 } as never), "E_OPTION", "alpha");
    expectLeewayError(() => mannKendall([1, Number.NaN]), "E_NON_FINITE", "values[1]");
  });

  it("refuses every corrupted snapshot", () => {
    const t = new WindowTrend({ width: 6 });
    t.observeMany(Float64Array.from([3, 1, 4, 1, 5, 9, 2, 6]));
    expectRefusesCorruptions((s) => WindowTrend.restore(s), t.snapshot(), { sizePaths: [["width"]] });
    const part = new WindowTrend({ width: 6 });
    part.observeMany(Float64Array.from([3, 1]));
    expectRefusesCorruptions((s) => WindowTrend.restore(s), part.snapshot(), { sizePaths: [["width"]] });
  });
});
