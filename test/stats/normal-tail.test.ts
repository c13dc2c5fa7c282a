import fc from "fast-check";
import * as ss from "simple-statistics";
import { describe, expect, it } from "vitest";
import { erfc, normalCdf, normalSurvival } from "@leeway/stats";

describe("erfc and normalSurvival", () => {
  it("erfc(x) + erfc(−x) = 2 and erfc decreases", () => {
    fc.assert(
      fc.property(fc.double({ min: -6, max: 6, noNaN: true }), (x) => {
        expect(erfc(x) + erfc(-x)).toBeCloseTo(2, 14);
        expect(erfc(x + 0.01)).toBeLessThanOrEqual(erfc(x)); // equal only where 2 − erfc rounds to the same double
      }),
    );
    expect(erfc(0)).toBe(1);
    expect(erfc(Infinity)).toBe(0);
    expect(erfc(-Infinity)).toBe(2);
    expect(erfc(Number.NaN)).toBeNaN();
  });

  it("the two evaluation methods join smoothly at x = 2.5", () => {
    const below = erfc(2.5 - 1e-12);
    const above = erfc(2.5);
    expect(Math.abs(below - above) / above).toBeLessThan(1e-9);
  });

  it("agrees with simple-statistics' erf where that is accurate (general-purpose reference; its erf is good to about 1e-7)", () => {
    for (let x = 0; x < 2; x += 0.05) expect(Math.abs(1 - erfc(x) - ss.errorFunction(x))).toBeLessThan(2e-7);
  });

  it("normal tail values: P(Z > 1.96) = 0.0249979, P(Z > 3) = 0.0013499, P(Z > 6) = 9.8659e-10 (standard normal table, common practice, no source)", () => {
    expect(normalSurvival(1.959963984540054)).toBeCloseTo(0.025, 12);
    expect(normalSurvival(3)).toBeCloseTo(0.0013498980316301, 13);
    expect(normalSurvival(6) / 9.865876450377e-10).toBeCloseTo(1, 9);
  });

  it("normalCdf matches Φ(−3) = 0.0013498980316301 and Φ(1.96) = 0.9750021048517795 (Abramowitz & Stegun, Table 26.1, from memory)", () => {
    expect(normalCdf(-3)).toBeCloseTo(0.0013498980316301, 15);
    expect(normalCdf(1.96)).toBeCloseTo(0.9750021048517795, 14);
  });

  it("normalCdf is symmetric, Φ(x) + Φ(−x) = 1, across the series/continued-fraction switch of erfc at |x| = 2.5√2", () => {
    for (const x of [0, 0.3, 2, 3.5, 3.53, 3.6, 6, 8]) expect(normalCdf(x) + normalCdf(-x)).toBeCloseTo(1, 14);
    expect(normalCdf(-3.5355)).toBeGreaterThan(normalCdf(-3.5356));
  });
});
