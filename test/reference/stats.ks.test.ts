import { describe, expect, it } from "vitest";
import { kolmogorovSurvival, ksTwoSample } from "@leeway/stats";

describe("two-sample Kolmogorov-Smirnov against published critical values", () => {
  it("c(0.05) = 1.358 and c(0.01) = 1.628: Q_KS(c(α)) = α (two-sample KS critical values table, 'Critical Values for the Two-sample Kolmogorov-Smirnov test (2-sided)': 1.36 and 1.63)", () => {
    expect(kolmogorovSurvival(1.3581)).toBeCloseTo(0.05, 4);
    expect(kolmogorovSurvival(1.6276)).toBeCloseTo(0.01, 4);
    expect(kolmogorovSurvival(1.36)).toBeCloseTo(0.05, 2);
    expect(kolmogorovSurvival(1.63)).toBeCloseTo(0.01, 3);
  });

  it("the other tabled levels: c = 1.22, 1.48, 1.73, 1.95 for α = 0.10, 0.025, 0.005, 0.001 (same table; CERN AN16pp node143 for 1.22)", () => {
    const table: [number, number][] = [
      [1.22, 0.1],
      [1.48, 0.025],
      [1.73, 0.005],
      [1.95, 0.001],
    ];
    for (const [c, alpha] of table) expect(Math.abs(kolmogorovSurvival(c) - alpha) / alpha).toBeLessThan(0.04); // the table prints two decimals
  });

  it("large-sample example α = 0.01, n₁ = 15, n₂ = 28: D_α = 0.522 is where the asymptotic p-value reaches 0.01 (same table, large-sample example)", () => {
    // Two samples with D just above and just below 0.522.
    const a = Array.from({ length: 15 }, (_, i) => i);
    const shift = (d: number): number[] => Array.from({ length: 28 }, (_, j) => j * (15 / 28) + d);
    const lambda = (d: number): number => Math.sqrt((15 * 28) / 43) * d;
    expect(kolmogorovSurvival(lambda(0.522))).toBeCloseTo(0.01, 3);
    const far = ksTwoSample(a, shift(9));
    expect(far.d).toBeGreaterThan(0.522);
    expect(far.pValue).toBeLessThan(0.01);
    const near = ksTwoSample(a, shift(2));
    expect(near.d).toBeLessThan(0.522);
    expect(near.pValue).toBeGreaterThan(0.01);
  });

  it("closed form c(α) = √(−½ ln(α/2)) inverts the leading term of Q_KS (Kolmogorov distribution asymptotics, from memory)", () => {
    for (const alpha of [0.1, 0.05, 0.01, 0.001]) expect(kolmogorovSurvival(Math.sqrt(-0.5 * Math.log(alpha / 2)))).toBeCloseTo(alpha, alpha > 0.05 ? 3 : 5);
  });
});
