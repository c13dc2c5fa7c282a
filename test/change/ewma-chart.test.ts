import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { EwmaChart } from "@leeway/change";
import { expectLeewayError } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";
import { expectRestoreContinues, expectScanEqualsObserve } from "./laws.js";

describe("EwmaChart", () => {
  it("statistic is |zᵢ|/σ_z with zᵢ = λuᵢ + (1 − λ)zᵢ₋₁ and the exact or asymptotic σ_z (brute force)", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -5, max: 5, noNaN: true }), { minLength: 1, maxLength: 50 }), fc.double({ min: 0.01, max: 1, noNaN: true }), fc.boolean(), (xs, lambda, exact) => {
        const chart = new EwmaChart({ mean: 2, sigma: 0.5, lambda, L: 1e6, limits: exact ? "exact" : "asymptotic" });
        let z = 0;
        xs.forEach((x, t) => {
          z = lambda * ((x - 2) / 0.5) + (1 - lambda) * z;
          const sd = Math.sqrt((lambda / (2 - lambda)) * (exact ? 1 - (1 - lambda) ** (2 * (t + 1)) : 1));
          const r = chart.observe(x);
          expect(r.statistic).toBeCloseTo(Math.abs(z) / sd, 8);
          expect(chart.ewma).toBeCloseTo(2 + 0.5 * z, 10);
        });
      }),
    );
  });

  it("λ = 1 is a Shewhart chart: change exactly when |x − μ₀| > Lσ", () => {
    const chart = new EwmaChart({ mean: 10, sigma: 2, lambda: 1, L: 3 });
    expect(chart.observe(15.9).status).toBe("warning");
    expect(chart.observe(4.1).status).toBe("warning");
    expect(chart.observe(16.1)).toMatchObject({ status: "change", direction: "up", onset: 2 });
  });

  it("exact limits are narrower at the start than the asymptotic ones", () => {
    const exact = new EwmaChart({ mean: 0, sigma: 1, lambda: 0.1, L: 3, limits: "exact" });
    const fixed = new EwmaChart({ mean: 0, sigma: 1, lambda: 0.1, L: 3 });
    expect(exact.observe(4).status).toBe("change"); // z = 0.4 > 3·0.1
    expect(fixed.observe(4).status).not.toBe("change"); // 0.4 < 3·√(0.1/1.9) = 0.688
  });

  it("scan equals observe sample for sample (same changes, same state)", () => {
    expectScanEqualsObserve(() => new EwmaChart({ mean: 0, sigma: 1, lambda: 0.2, L: 2.5 }));
    expectScanEqualsObserve(() => new EwmaChart({ burnIn: 8, lambda: 0.3, L: 2, limits: "exact", direction: "up", nonFinite: "skip" }));
  });

  it("snapshot mid-stream restores and continues identically", () => {
    const r = new RandomSource(4);
    const xs = Float64Array.from({ length: 400 }, (_, i) => r.normal() + (i > 250 ? 0.8 : 0));
    expectRestoreContinues(() => new EwmaChart({ burnIn: 60, lambda: 0.1, limits: "exact" }), EwmaChart.restore, xs);
    expectRestoreContinues(() => new EwmaChart({ mean: 0, sigma: 1 }), EwmaChart.restore, xs);
  });

  it("refuses every bad option with E_OPTION naming it, and non-finite samples with E_NON_FINITE", () => {
    expectLeewayError(() => new EwmaChart({ mean: 0, sigma: 1, lambda: 0 }), "E_OPTION", "lambda", "0");
    expectLeewayError(() => new EwmaChart({ mean: 0, sigma: 1, lambda: 1.1 }), "E_OPTION", "lambda");
    expectLeewayError(() => new EwmaChart({ mean: 0, sigma: 1, L: -3 }), "E_OPTION", "L");
    expectLeewayError(() => new EwmaChart({ mean: 0, sigma: 1, limits: "tight" as "exact" }), "E_OPTION", "limits");
    expectLeewayError(() => new EwmaChart({ mean: 0 }), "E_OPTION", "sigma");
    expectLeewayError(() => new EwmaChart(), "E_OPTION", "burnIn");
    expectLeewayError(() => new EwmaChart({ burnIn: 0 }), "E_OPTION", "burnIn");
    expectLeewayError(() => new EwmaChart({ mean: 0, sigma: 1, direction: 1 as unknown as "up" }), "E_OPTION", "direction");
    expectLeewayError(() => new EwmaChart({ mean: 0, sigma: 1, span: 3 } as object), "E_OPTION", "span");
    expectLeewayError(() => new EwmaChart({ mean: 0, sigma: 1 }).observe(Number.NaN), "E_NON_FINITE", "x");
    const skip = new EwmaChart({ mean: 0, sigma: 1, nonFinite: "skip" });
    expect(skip.observe(Infinity)).toMatchObject({ index: 0, status: "stable", skipped: 1 });
  });

  it("refuses a λ so small that λ/(2 − λ) underflows (the statistic would be infinite), naming the allowed range; λ = 1e-9 keeps readings finite (common practice, no source)", () => {
    expectLeewayError(() => new EwmaChart({ mean: 0, sigma: 1, lambda: Number.MIN_VALUE }), "E_OPTION", "lambda", "5e-324", "[1e-9, 1]");
    for (const limits of ["asymptotic", "exact"] as const) {
      const chart = new EwmaChart({ mean: 0, sigma: 1, lambda: 1e-9, limits });
      for (const x of [1e100, -1e100, 0, 3]) expect(Number.isFinite(chart.observe(x).statistic)).toBe(true);
      expect(EwmaChart.restore(JSON.parse(JSON.stringify(chart.snapshot()))).snapshot()).toEqual(chart.snapshot());
    }
  });

  it("refuses corrupted snapshots", () => {
    const during = new EwmaChart({ burnIn: 30 });
    during.scan(Float64Array.from({ length: 10 }, (_, i) => Math.sin(i)));
    expectRefusesCorruptions(EwmaChart.restore, during.snapshot());
    const after = new EwmaChart({ burnIn: 5, limits: "exact" });
    after.scan(Float64Array.from({ length: 30 }, (_, i) => Math.sin(i)));
    expectRefusesCorruptions(EwmaChart.restore, after.snapshot());
  });
});
