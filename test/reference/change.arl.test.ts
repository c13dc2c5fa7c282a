import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { cusumArl, Cusum, ewmaArl, EwmaChart, PageHinkley } from "@leeway/change";

/**
 * Mean run length of `runs` consecutive runs of a test (restarted after each alarm) on one N(shift, 1)
 * stream, through scan.
 */
function monteCarloArl(test: Cusum | EwmaChart | PageHinkley, shift: number, runs: number, seed: string): number {
  const r = new RandomSource(seed);
  const buffer = new Float64Array(1 << 15);
  r.fillNormal(buffer, shift, 1);
  let offset = 0;
  let consumed = 0; // samples up to and including the latest alarm
  let done = 0;
  let from = 0;
  while (done < runs) {
    const hit = test.scan(buffer, from);
    if (hit < 0) {
      offset += buffer.length;
      r.fillNormal(buffer, shift, 1);
      from = 0;
      continue;
    }
    consumed = offset + hit + 1;
    done++;
    test.restart();
    from = hit + 1;
  }
  return consumed / runs;
}

// Run lengths are close to geometric (sd ≈ mean), so the relative standard error of a mean of N runs is
// about 1/√N: N = 6400 gives 1.25 %, and ±5 % is four standard errors.
const RUNS = 6400;

describe("tabular CUSUM k = 0.5 (Montgomery & Runger, Applied Statistics and Probability for Engineers, Table 16-9; also Montgomery, ISQC, Table 9.3)", () => {
  const table: Record<number, Record<number, number>> = {
    4: { 0: 168, 0.5: 26.6, 1: 8.38, 2: 3.34, 3: 2.19 },
    5: { 0: 465, 0.5: 38.0, 1: 10.4, 2: 4.01, 3: 2.57 },
  };
  for (const h of [4, 5]) {
    for (const [shift, arl] of Object.entries(table[h] as Record<number, number>)) {
      it(`Monte Carlo ARL of Cusum h = ${h}, shift ${shift}σ ≈ ${arl} within ±5 %`, () => {
        const estimate = monteCarloArl(new Cusum({ mean: 0, sigma: 1, k: 0.5, h }), Number(shift), RUNS, `cusum/${h}/${shift}`);
        expect(Math.abs(estimate / arl - 1)).toBeLessThan(0.05);
      });
    }
  }

  it("cusumArl (Siegmund 1985) matches the table within 1.5 % for shifts δ ≤ 1", () => {
    for (const h of [4, 5]) {
      for (const [shift, arl] of Object.entries(table[h] as Record<number, number>)) {
        if (Number(shift) > 1) continue;
        expect(Math.abs(cusumArl(0.5, h, Number(shift)) / arl - 1)).toBeLessThan(0.015);
      }
    }
  });

  it("cusumArl one-sided in control ≈ 336 (h = 4) and 930 (h = 5) within 1 % (NIST e-Handbook §6.3.2.3.1, from memory)", () => {
    expect(Math.abs(cusumArl(0.5, 4, 0, { sides: 1 }) / 336 - 1)).toBeLessThan(0.01);
    expect(Math.abs(cusumArl(0.5, 5, 0, { sides: 1 }) / 930 - 1)).toBeLessThan(0.01);
  });

  it("two-sided is the harmonic combination of the sides: 1/ARL = 1/ARL⁺ + 1/ARL⁻ (Montgomery, ISQC §9.1)", () => {
    for (const shift of [0, 0.3, 1.2]) {
      const up = cusumArl(0.5, 4, shift, { sides: 1 });
      const down = cusumArl(0.5, 4, -shift, { sides: 1 });
      expect(cusumArl(0.5, 4, shift)).toBeCloseTo(1 / (1 / up + 1 / down), 9);
    }
  });

  it("PageHinkley with a known mean, δ = 0.5, λ = 4 has the one-sided CUSUM ARL0 2 × 168 = 336 within ±5 % (same table; two-sided ARL0 is half the one-sided)", () => {
    const estimate = monteCarloArl(new PageHinkley({ alarmLevel: 4, tolerance: 0.5, knownMean: 0, armAfter: 0 }), 0, RUNS, "ph");
    expect(Math.abs(estimate / 336 - 1)).toBeLessThan(0.05);
  });
});

describe("EWMA ARL by the Brook & Evans Markov chain (Lucas & Saccucci 1990, Technometrics 32:1-12)", () => {
  const shifts = [0, 0.25, 0.5, 0.75, 1, 1.5, 2, 2.5, 3, 4];
  // Montgomery, ISQC, Table 9.11 "adapted from Lucas & Saccucci (1990)" (from memory)
  const table: [number, number, number[]][] = [
    [0.4, 3.054, [500, 224, 71.2, 28.4, 14.3, 5.9, 3.5, 2.5, 2.0, 1.4]],
    [0.25, 2.998, [500, 170, 48.2, 20.1, 11.1, 5.5, 3.6, 2.7, 2.3, 1.7]],
    [0.2, 2.962, [500, 150, 41.8, 18.2, 10.5, 5.5, 3.7, 2.9, 2.4, 1.9]],
    [0.1, 2.814, [500, 106, 31.3, 15.9, 10.3, 6.1, 4.4, 3.4, 2.9, 2.2]],
    [0.05, 2.615, [500, 84.1, 28.8, 16.4, 11.4, 7.1, 5.2, 4.2, 3.5, 2.7]],
  ];
  for (const [lambda, L, arls] of table) {
    it(`λ = ${lambda}, L = ${L}: every shift within ±2 % (rounding of the printed table allowed)`, () => {
      shifts.forEach((shift, i) => {
        const printed = arls[i] as number;
        const rounding = 0.05 / printed; // the table prints one decimal
        expect(Math.abs(ewmaArl(lambda, L, shift) / printed - 1)).toBeLessThan(0.02 + rounding);
      });
    });
  }

  it("λ = 0.5, L = 3.071 and λ = 0.03, L = 2.437 (Lucas & Saccucci 1990, Table 3, via a public reproduction)", () => {
    const s = [0, 0.25, 0.5, 0.75, 1, 1.5, 2, 2.5, 3, 3.5, 4, 5];
    const half = [500, 255, 88.8, 35.9, 17.5, 6.53, 3.63, 2.5, 1.93, 1.58, 1.34, 1.07];
    const small = [500, 76.7, 29.3, 17.6, 12.6, 8.07, 5.99, 4.8, 4.03, 3.49, 3.11, 2.55];
    s.forEach((shift, i) => {
      expect(Math.abs(ewmaArl(0.5, 3.071, shift) / (half[i] as number) - 1)).toBeLessThan(0.02);
      expect(Math.abs(ewmaArl(0.03, 2.437, shift) / (small[i] as number) - 1)).toBeLessThan(0.02);
    });
  });

  it("λ = 1, L = 3 is the Shewhart chart: 370.4 in control and 43.9 at a 1σ shift (Champ & Woodall 1987, Table 1)", () => {
    expect(ewmaArl(1, 3, 0)).toBeCloseTo(370.4, 1);
    expect(ewmaArl(1, 3, 1)).toBeCloseTo(43.89, 1);
  });

  it("Monte Carlo ARL of EwmaChart (asymptotic limits) λ = 0.1, L = 2.814: 500 in control within ±5 % (Lucas & Saccucci 1990)", () => {
    const estimate = monteCarloArl(new EwmaChart({ mean: 0, sigma: 1, lambda: 0.1, L: 2.814 }), 0, RUNS, "ewma");
    expect(Math.abs(estimate / 500 - 1)).toBeLessThan(0.05);
  });
});
