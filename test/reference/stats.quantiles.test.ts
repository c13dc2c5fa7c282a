import * as ss from "simple-statistics";
import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { P2Quantile, QuantileSketch } from "@leeway/stats";

// Jain & Chlamtac (1985), CACM 28(10), the worked example for p = 0.5. The second observation is 0.15
// (some reproductions print 0.5; the paper's own marker table only fits 0.15).
const PAPER_DATA = [0.02, 0.15, 0.74, 3.39, 0.83, 22.37, 10.15, 15.43, 38.62, 15.92, 34.6, 10.28, 1.47, 0.4, 0.05, 11.39, 0.27, 0.42, 0.09, 11.37];
// j: [heights q1..q5 as printed in the paper (2 dp), positions n1..n5]
const PAPER_TABLE: [number, number[], number[]][] = [
  [6, [0.02, 0.15, 0.74, 0.83, 22.37], [1, 2, 3, 4, 6]],
  [7, [0.02, 0.15, 0.74, 4.47, 22.37], [1, 2, 3, 5, 7]],
  [8, [0.02, 0.15, 2.18, 8.6, 22.37], [1, 2, 4, 6, 8]],
  [9, [0.02, 0.87, 4.75, 15.52, 38.62], [1, 3, 5, 7, 9]],
  [10, [0.02, 0.87, 4.75, 15.52, 38.62], [1, 3, 5, 7, 10]],
  [11, [0.02, 0.87, 9.28, 21.58, 38.62], [1, 3, 6, 8, 11]],
  [12, [0.02, 0.87, 9.28, 21.58, 38.62], [1, 3, 6, 9, 12]],
  [13, [0.02, 2.14, 9.28, 21.58, 38.62], [1, 4, 7, 10, 13]],
  [14, [0.02, 2.14, 9.28, 21.58, 38.62], [1, 5, 8, 11, 14]],
  [15, [0.02, 0.74, 6.3, 21.58, 38.62], [1, 5, 8, 12, 15]],
  [16, [0.02, 0.74, 6.3, 21.58, 38.62], [1, 5, 8, 13, 16]],
  [17, [0.02, 0.59, 6.3, 17.22, 38.62], [1, 5, 9, 13, 17]],
  [18, [0.02, 0.59, 6.3, 17.22, 38.62], [1, 6, 10, 14, 18]],
  [19, [0.02, 0.5, 4.44, 17.22, 38.62], [1, 6, 10, 15, 19]],
  [20, [0.02, 0.5, 4.44, 17.22, 38.62], [1, 6, 10, 16, 20]],
];

describe("P2Quantile against the P² paper", () => {
  it("reproduces every marker position exactly and every height within 0.02 (Jain & Chlamtac 1985, CACM 28(10), worked example table; heights hand-rounded in the paper)", () => {
    const q = new P2Quantile({ p: 0.5 });
    let row = 0;
    PAPER_DATA.forEach((x, i) => {
      q.observe(x);
      const entry = PAPER_TABLE[row];
      if (entry === undefined || entry[0] !== i + 1) return;
      row++;
      expect(Array.from(q.positions())).toEqual(entry[2]);
      Array.from(q.heights()).forEach((h, m) => expect(Math.abs(h - (entry[1][m] as number))).toBeLessThanOrEqual(0.02));
    });
    expect(row).toBe(PAPER_TABLE.length);
  });

  it("final median estimate 4.44063 after 20 observations (Jain & Chlamtac 1985, CACM 28(10), worked example; exact value by an independent P² implementation)", () => {
    const q = new P2Quantile({ p: 0.5 });
    q.observeMany(Float64Array.from(PAPER_DATA));
    expect(q.estimate).toBeCloseTo(4.4406343532603376, 12);
    expect(q.estimate).toBeCloseTo(4.44, 2);
  });
});

describe("quantile estimators against simple-statistics (general-purpose reference)", () => {
  const r = new RandomSource("ref-quantiles");
  const xs = Float64Array.from({ length: 50_000 }, () => 0.07 * Math.exp(0.3 * r.normal()));
  const sorted = Array.from(xs).sort((a, b) => a - b);
  /** Fraction of the sample ≤ v (simple-statistics' quantileRankSorted counts ties as half). */
  const rankOf = (v: number): number => ss.quantileRankSorted(sorted, v);

  for (const p of [0.5, 0.9, 0.99]) {
    it(`P² p = ${p} on 50 000 log-normal scores lies within 0.005 of rank of simple-statistics' sample quantile (simple-statistics 7 quantileSorted)`, () => {
      const q = new P2Quantile({ p });
      q.observeMany(xs);
      const reference = ss.quantileSorted(sorted, p);
      expect(Math.abs(rankOf(q.estimate) - rankOf(reference))).toBeLessThan(0.005);
      expect(Math.abs(q.estimate - reference) / reference).toBeLessThan(0.02);
    });
  }

  it("QuantileSketch k = 200 quantiles agree with simple-statistics' within the sketch's rank-error bound (simple-statistics 7 quantileSorted, quantileRankSorted)", () => {
    const s = new QuantileSketch({ k: 200, seed: "ref" });
    s.observeMany(xs);
    const eps = s.rankErrorBound(1e-6);
    for (const p of [0.01, 0.1, 0.25, 0.5, 0.75, 0.9, 0.99]) {
      const est = s.quantile(p);
      expect(Math.abs(rankOf(est) - p)).toBeLessThanOrEqual(eps + 1 / xs.length);
      expect(Math.abs(s.rank(ss.quantileSorted(sorted, p)) - p)).toBeLessThanOrEqual(eps + 1 / xs.length);
    }
    expect(s.min).toBe(ss.min(sorted));
    expect(s.max).toBe(ss.max(sorted));
  });
});
