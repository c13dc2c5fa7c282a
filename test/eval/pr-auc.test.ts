import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { prAuc } from "@leeway/eval";
import { expectLeewayError } from "../support/errors.js";

// Brute force: at each distinct score t (descending) flag every sample with score ≥ t;
// add (recall gain) × precision.
function bruteAveragePrecision(scores: readonly number[], labels: readonly boolean[]): number {
  const positives = labels.filter(Boolean).length;
  const thresholds = [...new Set(scores)].sort((a, b) => b - a);
  let area = 0;
  let previousRecall = 0;
  for (const t of thresholds) {
    let tp = 0;
    let flagged = 0;
    scores.forEach((s, i) => {
      if (s >= t) {
        flagged++;
        if (labels[i]) tp++;
      }
    });
    const recall = tp / positives;
    area += (recall - previousRecall) * (tp / flagged);
    previousRecall = recall;
  }
  return area;
}

const labelledScores = fc
  .array(fc.tuple(fc.integer({ min: 0, max: 6 }), fc.boolean()), { minLength: 2, maxLength: 60 })
  .filter((rows) => rows.some(([, l]) => l) && rows.some(([, l]) => !l));

describe("prAuc", () => {
  it("equals the brute-force sum of recall gain × precision over distinct thresholds", () => {
    fc.assert(
      fc.property(labelledScores, (rows) => {
        const scores = rows.map(([s]) => s);
        const labels = rows.map(([, l]) => l);
        expect(prAuc(scores, labels)).toBeCloseTo(bruteAveragePrecision(scores, labels), 12);
      }),
      { numRuns: 300 },
    );
  });

  it("without ties equals the mean, over positives, of the precision at each positive's rank", () => {
    fc.assert(
      fc.property(fc.uniqueArray(fc.integer({ min: 0, max: 10_000 }), { minLength: 2, maxLength: 50 }), fc.infiniteStream(fc.boolean()), (values, coin) => {
        const labels = values.map(() => coin.next().value as boolean);
        fc.pre(labels.some(Boolean) && labels.some((l) => !l));
        const order = values.map((v, i) => ({ v, l: labels[i] as boolean })).sort((a, b) => b.v - a.v);
        let tp = 0;
        let sum = 0;
        order.forEach((o, rank) => {
          if (o.l) {
            tp++;
            sum += tp / (rank + 1);
          }
        });
        expect(prAuc(values, labels)).toBeCloseTo(sum / tp, 12);
      }),
    );
  });

  it("does not depend on the order of the samples", () => {
    fc.assert(
      fc.property(labelledScores, fc.integer({ min: 1, max: 1000 }), (rows, shift) => {
        const rotated = [...rows.slice(shift % rows.length), ...rows.slice(0, shift % rows.length)];
        expect(prAuc(rotated.map(([s]) => s), rotated.map(([, l]) => l))).toBe(prAuc(rows.map(([s]) => s), rows.map(([, l]) => l)));
      }),
    );
  });

  it("is 1 for perfect separation and the positive fraction when every score is tied", () => {
    expect(prAuc([1, 2, 3, 4], [false, false, true, true])).toBe(1);
    expect(prAuc([3, 3, 3, 3], [false, false, false, true])).toBe(0.25);
    expect(prAuc([0.1, 0.4, 0.35, 0.8], [false, false, true, true])).toBeCloseTo(0.5 + 0.5 * (2 / 3), 15);
  });

  it("refuses a single class and non-finite scores", () => {
    expectLeewayError(() => prAuc([1, 2], [false, false]), "E_OPTION", "labels");
    expectLeewayError(() => prAuc([1, Infinity], [false, true]), "E_NON_FINITE", "scores[1]", "Infinity");
  });
});
