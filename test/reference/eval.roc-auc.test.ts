import fc from "fast-check";
import { wilcoxonRankSum } from "simple-statistics";
import { describe, expect, it } from "vitest";
import { mannWhitney, rocAuc } from "@leeway/eval";

// Hanley & McNeil (1982), "The meaning and use of the area under a receiver
// operating characteristic (ROC) curve", Radiology 143:29–36, Table I: CT
// ratings of 109 patients, 1 = definitely normal … 5 = definitely abnormal.
const normalCounts = [33, 6, 6, 11, 2];
const abnormalCounts = [3, 2, 2, 11, 33];

function ratings(): { scores: number[]; labels: boolean[] } {
  const scores: number[] = [];
  const labels: boolean[] = [];
  normalCounts.forEach((count, r) => {
    for (let i = 0; i < count; i++) {
      scores.push(r + 1);
      labels.push(false);
    }
  });
  abnormalCounts.forEach((count, r) => {
    for (let i = 0; i < count; i++) {
      scores.push(r + 1);
      labels.push(true);
    }
  });
  return { scores, labels };
}

describe("ROC AUC against published and general-purpose references", () => {
  it("Hanley & McNeil (1982) Table I rating data: area 0.893 (58 normal, 51 abnormal)", () => {
    const { scores, labels } = ratings();
    const result = mannWhitney(scores, labels);
    expect(result.negatives).toBe(58);
    expect(result.positives).toBe(51);
    // The paper prints the area to three decimals.
    expect(Number(result.auc.toFixed(3))).toBe(0.893);
  });

  it("Hanley & McNeil (1982) Table I: U by hand from the table, Σ_r a_r·(N_<r + ½·N_r) = 2642 of 2958 pairs", () => {
    // The rating table worked by hand: for each abnormal rating r, the normals rated below r plus half those rated r.
    let u = 0;
    let normalsBelow = 0;
    abnormalCounts.forEach((a, r) => {
      const tied = normalCounts[r] as number;
      u += a * (normalsBelow + tied / 2);
      normalsBelow += tied;
    });
    expect(u).toBe(2642);
    const { scores, labels } = ratings();
    expect(mannWhitney(scores, labels).u).toBe(u);
    expect(rocAuc(scores, labels)).toBe(2642 / 2958);
  });

  it("U equals the Wilcoxon rank sum with mid-ranks minus n₁(n₁+1)/2 (simple-statistics wilcoxonRankSum)", () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: 0, max: 8 }), { minLength: 1, maxLength: 40 }),
        fc.array(fc.integer({ min: 0, max: 8 }), { minLength: 1, maxLength: 40 }),
        (pos, neg) => {
          const rankSum = wilcoxonRankSum(pos, neg);
          const u = rankSum - (pos.length * (pos.length + 1)) / 2;
          const result = mannWhitney([...pos, ...neg], [...pos.map(() => true), ...neg.map(() => false)]);
          expect(result.u).toBeCloseTo(u, 9);
        },
      ),
    );
  });
});
