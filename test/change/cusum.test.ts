import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { Cusum } from "@leeway/change";
import { expectLeewayError } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";
import { expectRestoreContinues, expectScanEqualsObserve } from "./laws.js";

const noise = (seed: number, n: number, shiftAt = Infinity, shift = 0): Float64Array => {
  const r = new RandomSource(seed);
  return Float64Array.from({ length: n }, (_, i) => r.normal() + (i >= shiftAt ? shift : 0));
};

describe("Cusum", () => {
  it("follows the tabular recursion C⁺ = max(0, C⁺ + z − k), C⁻ = max(0, C⁻ − z − k) (brute force)", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -5, max: 5, noNaN: true }), { minLength: 1, maxLength: 60 }), fc.double({ min: 0, max: 1, noNaN: true }), (xs, k) => {
        const test = new Cusum({ mean: 1, sigma: 2, k, h: 1e9 });
        let up = 0;
        let lo = 0;
        for (const x of xs) {
          const z = (x - 1) / 2;
          up = Math.max(0, up + z - k);
          lo = Math.max(0, lo - z - k);
          const reading = test.observe(x);
          expect(test.upper).toBeCloseTo(up, 12);
          expect(test.lower).toBeCloseTo(lo, 12);
          expect(reading.statistic).toBeCloseTo(Math.max(up, lo), 12);
        }
      }),
    );
  });

  it("alarms when a side passes h, names the side and the last zero as onset", () => {
    const test = new Cusum({ mean: 0, sigma: 1, k: 0.5, h: 4 });
    const xs = [0, -1, 0.2, 1.5, 1.5, 1.5, 1.5];
    const readings = xs.map((x) => test.observe(x));
    // C⁺: 0, 0, 0, 1, 2, 3, 4 → not > 4 yet; one more passes
    expect(readings.map((r) => r.status)).toEqual(["stable", "stable", "stable", "stable", "stable", "warning", "warning"]);
    const alarm = test.observe(1.5);
    expect(alarm).toMatchObject({ index: 7, status: "change", statistic: 5, threshold: 4, direction: "up", onset: 3 });
    test.restart();
    expect(test.upper).toBe(0);
    expect(test.observe(-5).direction).toBe("down");
  });

  it("one-sided: direction up ignores decreases", () => {
    const test = new Cusum({ mean: 0, sigma: 1, h: 2, direction: "up" });
    expect(test.scan(new Float64Array(50).fill(-10))).toBe(-1);
    expect(test.observe(-10).statistic).toBe(0);
  });

  it("head start: both sums start and restart at it (Lucas & Crosier's fast initial response)", () => {
    const test = new Cusum({ mean: 0, sigma: 1, h: 4, headStart: 2 });
    expect(test.upper).toBe(2);
    test.observe(3);
    test.restart();
    expect([test.upper, test.lower]).toEqual([2, 2]);
  });

  it("burn-in estimates μ₀ and σ by the sample mean and sample sd, and restart keeps them", () => {
    const xs = noise(3, 300);
    const test = new Cusum({ burnIn: 100, h: 5 });
    for (let i = 0; i < 100; i++) expect(test.observe(xs[i] as number).statistic).toBe(0);
    const head = Array.from(xs.subarray(0, 100));
    const mean = head.reduce((a, b) => a + b, 0) / 100;
    const sd = Math.sqrt(head.reduce((a, b) => a + (b - mean) ** 2, 0) / 99);
    expect(test.mean).toBeCloseTo(mean, 12);
    expect(test.sigma).toBeCloseTo(sd, 12);
    test.restart();
    expect(test.mean).toBeCloseTo(mean, 12);
  });

  it("burn-in extends while all samples are equal", () => {
    const test = new Cusum({ burnIn: 3 });
    for (let i = 0; i < 10; i++) test.observe(7);
    expect(test.mean).toBeNull();
    test.observe(8);
    expect(test.mean).toBeCloseTo(7 + 1 / 11, 12);
  });

  it("scan equals observe sample for sample (same changes, same state)", () => {
    expectScanEqualsObserve(() => new Cusum({ mean: 0, sigma: 1, h: 3 }));
    expectScanEqualsObserve(() => new Cusum({ burnIn: 10, h: 2, headStart: 1, direction: "down", nonFinite: "skip" }));
  });

  it("snapshot mid-stream restores and continues identically; same inputs give the same snapshot", () => {
    const xs = noise(5, 400, 250, 1.5);
    expectRestoreContinues(() => new Cusum({ burnIn: 50, h: 4 }), Cusum.restore, xs);
    expectRestoreContinues(() => new Cusum({ mean: 0, sigma: 1, h: 4 }), Cusum.restore, xs);
    const a = new Cusum({ mean: 0, sigma: 1 });
    const b = new Cusum({ mean: 0, sigma: 1 });
    a.scan(xs);
    b.scan(xs);
    expect(a.snapshot()).toEqual(b.snapshot());
  });

  it("refuses every bad option with E_OPTION naming it", () => {
    expectLeewayError(() => new Cusum({ mean: 0, sigma: 1, h: -1 }), "E_OPTION", "h", "-1");
    expectLeewayError(() => new Cusum({ mean: 0, sigma: 1, k: -0.1 }), "E_OPTION", "k");
    expectLeewayError(() => new Cusum({ mean: 0, sigma: 0 }), "E_OPTION", "sigma", "0");
    expectLeewayError(() => new Cusum({ mean: Number.NaN, sigma: 1 }), "E_OPTION", "mean");
    expectLeewayError(() => new Cusum({ sigma: 1 }), "E_OPTION", "mean");
    expectLeewayError(() => new Cusum({}), "E_OPTION", "burnIn");
    expectLeewayError(() => new Cusum({ burnIn: 1 }), "E_OPTION", "burnIn");
    expectLeewayError(() => new Cusum({ mean: 0, sigma: 1, burnIn: 10 }), "E_OPTION", "burnIn");
    expectLeewayError(() => new Cusum({ mean: 0, sigma: 1, h: 4, headStart: 4 }), "E_OPTION", "headStart");
    expectLeewayError(() => new Cusum({ mean: 0, sigma: 1, direction: "sideways" as "up" }), "E_OPTION", "direction");
    expectLeewayError(() => new Cusum({ mean: 0, sigma: 1, warningFraction: 0 }), "E_OPTION", "warningFraction");
    expectLeewayError(() => new Cusum({ mean: 0, sigma: 1, nonFinite: "drop" as "skip" }), "E_OPTION", "nonFinite");
    expectLeewayError(() => new Cusum({ mean: 0, sigma: 1, hh: 3 } as object), "E_OPTION", "hh");
    expectLeewayError(() => new Cusum({ mean: 0, sigma: 1 }).scan(new Float64Array(3), 4), "E_OPTION", "from");
  });

  it("refuses non-finite samples, or skips and counts them", () => {
    const strict = new Cusum({ mean: 0, sigma: 1 });
    expectLeewayError(() => strict.observe(Number.NaN), "E_NON_FINITE", "x", "NaN");
    expectLeewayError(() => strict.scan(new Float64Array([1, Infinity])), "E_NON_FINITE", "xs[1]");
    expect(strict.count).toBe(1);
    const lenient = new Cusum({ mean: 0, sigma: 1, nonFinite: "skip" });
    lenient.observe(1);
    const r = lenient.observe(Number.NaN);
    expect(r).toMatchObject({ index: 1, skipped: 1 });
    expect(lenient.upper).toBe(0.5);
    expect(lenient.snapshot().state.skipped).toBe(1);
  });

  it("refuses corrupted snapshots", () => {
    const during = new Cusum({ burnIn: 20 });
    during.scan(noise(1, 10));
    expectRefusesCorruptions(Cusum.restore, during.snapshot());
    const after = new Cusum({ burnIn: 20, headStart: 1 });
    after.scan(noise(1, 60));
    expectRefusesCorruptions(Cusum.restore, after.snapshot());
    const given = new Cusum({ mean: 0, sigma: 1 });
    given.scan(noise(2, 30));
    expectRefusesCorruptions(Cusum.restore, given.snapshot());
  });
});
