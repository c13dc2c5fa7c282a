import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { Adwin } from "@leeway/change";
import { expectLeewayError } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";
import { expectRestoreContinues, expectScanEqualsObserve } from "./laws.js";

const levelled = fc
  .array(fc.record({ level: fc.integer({ min: 0, max: 30 }), length: fc.integer({ min: 1, max: 300 }) }), { minLength: 1, maxLength: 6 })
  .chain((segments) => fc.array(fc.integer({ min: 0, max: 4 }), { minLength: 1, maxLength: 9 }).map((noise) => {
    const out: number[] = [];
    let k = 0;
    for (const s of segments) for (let i = 0; i < s.length; i++) out.push(s.level + (noise[k++ % noise.length] as number));
    return out;
  }));

describe("Adwin", () => {
  it("the window mean always equals the mean of the last `width` inputs (brute force, exact on integers)", () => {
    fc.assert(
      fc.property(levelled, fc.integer({ min: 1, max: 16 }), fc.constantFrom(0.001, 0.05, 0.3), fc.integer({ min: 2, max: 6 }), (xs, checkPeriod, delta, buckets) => {
        const adwin = new Adwin({ delta, checkPeriod, buckets, minSubWindow: 2 });
        xs.forEach((x, t) => {
          const r = adwin.observe(x);
          let sum = 0;
          for (let s = t - r.width + 1; s <= t; s++) sum += xs[s] as number;
          expect(r.width).toBeGreaterThan(0);
          expect(r.mean).toBe(sum / r.width);
        });
      }),
      { numRuns: 60 },
    );
  });

  it("the window variance equals the population variance of the window (brute force)", () => {
    const r = new RandomSource(2);
    const xs = Array.from({ length: 3000 }, (_, i) => r.normal() * 2 + (i > 1500 ? 3 : 0));
    const adwin = new Adwin({ delta: 0.01 });
    xs.forEach((x, t) => {
      adwin.observe(x);
      if (t % 97 !== 0) return;
      const window = xs.slice(t - adwin.width + 1, t + 1);
      const mean = window.reduce((a, b) => a + b, 0) / window.length;
      const variance = window.reduce((a, b) => a + (b - mean) ** 2, 0) / window.length;
      expect(adwin.variance).toBeCloseTo(variance, 8);
    });
  });

  it("memory stays O(M·log W): at most M buckets per level", () => {
    const adwin = new Adwin({ buckets: 5, delta: 1e-6 });
    const r = new RandomSource(8);
    const xs = Float64Array.from({ length: 200_000 }, () => r.next());
    adwin.scan(xs);
    expect(adwin.width).toBe(200_000);
    expect(adwin.bucketCount).toBeLessThanOrEqual(5 * (Math.log2(200_000 / 5) + 2));
  });

  it("a cut reads change, with the onset at the first kept sample and the direction of the newer part", () => {
    const adwin = new Adwin({ delta: 0.002, checkPeriod: 1 });
    const xs = Float64Array.from({ length: 1200 }, (_, i) => (i < 1000 ? (i % 2) : 5 + (i % 2)));
    let change = null;
    for (let i = 0; i < xs.length && change === null; i++) {
      const reading = adwin.observe(xs[i] as number);
      if (reading.status === "change") change = reading;
    }
    expect(change).not.toBeNull();
    expect(change?.direction).toBe("up");
    expect(change?.statistic).toBeGreaterThanOrEqual(1);
    expect(change?.onset).toBe((change?.index ?? 0) - (change?.width ?? 0) + 1);
    adwin.restart();
    expect(adwin.width).toBe(0);
  });

  it("scan equals observe sample for sample (same changes, same state)", () => {
    expectScanEqualsObserve(() => new Adwin({ delta: 0.05, checkPeriod: 4, minSubWindow: 3 }));
    expectScanEqualsObserve(() => new Adwin({ delta: 0.1, bound: "hoeffding", checkPeriod: 1, nonFinite: "skip" }));
  });

  it("snapshot mid-stream restores and continues identically", () => {
    const r = new RandomSource(6);
    const xs = Float64Array.from({ length: 3000 }, (_, i) => r.normal() + (i > 1800 ? 1 : 0));
    expectRestoreContinues(() => new Adwin({ delta: 0.01 }), Adwin.restore, xs);
  });

  it("refuses every bad option with E_OPTION naming it, and non-finite samples with E_NON_FINITE", () => {
    expectLeewayError(() => new Adwin({ delta: 0 }), "E_OPTION", "delta", "0");
    expectLeewayError(() => new Adwin({ delta: 1 }), "E_OPTION", "delta");
    expectLeewayError(() => new Adwin({ buckets: 1 }), "E_OPTION", "buckets");
    expectLeewayError(() => new Adwin({ checkPeriod: 0 }), "E_OPTION", "checkPeriod");
    expectLeewayError(() => new Adwin({ minSubWindow: 0 }), "E_OPTION", "minSubWindow");
    expectLeewayError(() => new Adwin({ bound: "chernoff" as "variance" }), "E_OPTION", "bound");
    expectLeewayError(() => new Adwin({ threshold: -1 }), "E_OPTION", "threshold");
    expectLeewayError(() => new Adwin({ clock: 32 } as object), "E_OPTION", "clock");
    expectLeewayError(() => new Adwin().observe(Number.NaN), "E_NON_FINITE", "x");
    expectLeewayError(() => new Adwin().scan(new Float64Array([0, Infinity])), "E_NON_FINITE", "xs[1]");
    const skip = new Adwin({ nonFinite: "skip" });
    expect(skip.observe(Number.NaN)).toMatchObject({ skipped: 1, width: 0 });
  });

  it("refuses snapshots whose bucket sums, spreads or window total lie beyond what samples within ±1e100 can give (common practice, no source)", () => {
    const adwin = new Adwin({ delta: 0.002 });
    adwin.scan(Float64Array.from({ length: 300 }, (_, i) => Math.sin(i)));
    const cases: [string, number | null, number][] = [["bucketTotals", 0, 1e300], ["bucketM2", 0, 1e300], ["total", null, 1e300], ["bucketTotals", 0, -1e300]];
    for (const [field, at, value] of cases) {
      const bad = JSON.parse(JSON.stringify(adwin.snapshot()));
      if (at === null) bad.state[field] = value;
      else bad.state[field][at] = value;
      expectLeewayError(() => Adwin.restore(bad), "E_SNAPSHOT", field, "1e+100");
    }
  });

  it("refuses corrupted snapshots, cross-checking the buckets against the width", () => {
    const adwin = new Adwin({ delta: 0.01, checkPeriod: 8 });
    adwin.scan(Float64Array.from({ length: 237 }, (_, i) => Math.sin(i)));
    const paths = [["levelCounts"], ["bucketTotals"], ["bucketM2"]];
    expectRefusesCorruptions(Adwin.restore, adwin.snapshot(), { variableLengthPaths: paths });
    const s = adwin.snapshot();
    expectLeewayError(() => Adwin.restore({ ...s, state: { ...s.state, width: s.state.width + 1 } }), "E_SNAPSHOT", "width");
    expectLeewayError(() => Adwin.restore({ ...s, state: { ...s.state, levelCounts: [...s.state.levelCounts, 1] } }), "E_SNAPSHOT");
  });
});
