import * as ss from "simple-statistics";
import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { EwMoments, Moments, WindowMoments } from "@leeway/stats";

/** NIST StRD NumAcc data: the first value, then 500 pairs (first − d, first + d)... as the dataset defines it. */
function numAcc(center: number, low: number, high: number): Float64Array {
  const xs = [center];
  for (let i = 0; i < 500; i++) xs.push(low, high);
  return Float64Array.from(xs);
}

/** NIST's log relative error: the number of correct significant digits. */
function lre(x: number, certified: number): number {
  return x === certified ? 15 : -Math.log10(Math.abs(x - certified) / Math.abs(certified));
}

describe("Moments against outside references", () => {
  it("mean, variances, std, min and max match simple-statistics on skewed score data (simple-statistics 7, general-purpose reference)", () => {
    const r = new RandomSource("ref-moments");
    const xs = Float64Array.from({ length: 5000 }, () => 0.07 * Math.exp(0.4 * r.normal()));
    const m = new Moments();
    m.observeMany(xs);
    const arr = Array.from(xs);
    expect(m.mean).toBeCloseTo(ss.mean(arr), 14);
    expect(m.variance / ss.variance(arr)).toBeCloseTo(1, 12);
    expect(m.sampleVariance / ss.sampleVariance(arr)).toBeCloseTo(1, 12);
    expect(m.std / ss.standardDeviation(arr)).toBeCloseTo(1, 12);
    expect(m.sampleStd / ss.sampleStandardDeviation(arr)).toBeCloseTo(1, 12);
    expect(m.min).toBe(ss.min(arr));
    expect(m.max).toBe(ss.max(arr));
  });

  const nist: [string, Float64Array, number, number][] = [
    ["NumAcc1", Float64Array.from([10000001, 10000003, 10000002]), 10000002, 1],
    ["NumAcc2", numAcc(1.2, 1.1, 1.3), 1.2, 0.1],
    ["NumAcc3", numAcc(1000000.2, 1000000.1, 1000000.3), 1000000.2, 0.1],
    ["NumAcc4", numAcc(10000000.2, 10000000.1, 10000000.3), 10000000.2, 0.1],
  ];
  for (const [name, xs, mean, sd] of nist) {
    it(`${name}: certified mean ${mean} and sample SD ${sd} (NIST StRD univariate summary statistics, ${name} certified values)`, () => {
      for (const make of [() => new Moments(), () => new Moments({ weighted: true })]) {
        const m = make();
        m.observeMany(xs);
        const one = make();
        for (const x of xs) one.observe(x);
        for (const acc of [m, one]) {
          expect(acc.count).toBe(xs.length);
          expect(lre(acc.mean, mean)).toBeGreaterThanOrEqual(14);
          // NIST grades NumAcc4 "higher difficulty"; a stable one-pass method keeps ≥ 8 digits of the SD there.
          expect(lre(acc.sampleStd, sd)).toBeGreaterThanOrEqual(name === "NumAcc1" || name === "NumAcc2" ? 13 : 8);
        }
      }
      const w = new WindowMoments({ width: xs.length });
      w.observeMany(xs);
      expect(lre(w.mean, mean)).toBeGreaterThanOrEqual(14);
      expect(lre(Math.sqrt(w.sampleVariance), sd)).toBeGreaterThanOrEqual(8);
    });
  }

  it("Chan-Golub-LeVeque combination of A = [1, 2, 3, 4] and B = [10, 20, 30]: n = 7, mean 10, M2 = 730, s² = 121.667 (Chan, Golub & LeVeque 1979, pairwise update; values from memory, checked by direct calculation)", () => {
    const a = new Moments();
    a.observeMany(Float64Array.from([1, 2, 3, 4]));
    const b = new Moments();
    b.observeMany(Float64Array.from([10, 20, 30]));
    a.merge(b);
    expect(a.count).toBe(7);
    expect(a.mean).toBeCloseTo(10, 13);
    expect(a.sumSquaredDeviations).toBeCloseTo(730, 11);
    expect(a.sampleVariance).toBeCloseTo(121.6667, 4);
  });

  it("[2, 4, 4, 4, 5, 5, 7, 9] has mean 5, population SD 2 and sample variance 4.5714 (standard-deviation textbook example, from memory)", () => {
    const m = new Moments();
    m.observeMany(Float64Array.from([2, 4, 4, 4, 5, 5, 7, 9]));
    expect(m.mean).toBe(5);
    expect(m.std).toBe(2);
    expect(m.sampleVariance).toBeCloseTo(4.5714, 4);
  });

  it("exponentially weighted mean with α = 1 follows the last sample, and with a half-life of 1 weighs 1/3, 2/3 (definition of the EWMA, common practice, no source)", () => {
    const last = new EwMoments({ alpha: 1 });
    last.observeMany(Float64Array.from([3, 8, -1]));
    expect(last.mean).toBe(-1);
    expect(last.variance).toBe(0);
    const half = new EwMoments({ halfLife: 1 });
    half.observeMany(Float64Array.from([1, 4]));
    expect(half.mean).toBeCloseTo(3, 14);
    expect(half.variance).toBeCloseTo(2, 14); // (1/3)(1 − 3)² + (2/3)(4 − 3)²
  });
});
