import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { mannWhitney, rocAuc } from "@leeway/eval";
import { expectLeewayError } from "../support/errors.js";

// Brute force: every (positive, negative) pair, 1 when the positive scores higher, ½ on a tie.
function pairCount(scores: readonly number[], labels: readonly boolean[]): { u: number; pairs: number } {
  let u = 0;
  let pairs = 0;
  for (let i = 0; i < scores.length; i++) {
    if (!labels[i]) continue;
    for (let j = 0; j < scores.length; j++) {
      if (labels[j]) continue;
      pairs++;
      const a = scores[i] as number;
      const b = scores[j] as number;
      u += a > b ? 1 : a === b ? 0.5 : 0;
    }
  }
  return { u, pairs };
}

// Small integer scores make ties common; both classes present.
const labelledScores = fc
  .array(fc.tuple(fc.integer({ min: 0, max: 6 }), fc.boolean()), { minLength: 2, maxLength: 60 })
  .filter((rows) => rows.some(([, l]) => l) && rows.some(([, l]) => !l));

describe("rocAuc", () => {
  it("U equals brute-force pair counting with ties counted ½, and AUC = U/(n₁n₀)", () => {
    fc.assert(
      fc.property(labelledScores, (rows) => {
        const scores = rows.map(([s]) => s / 2);
        const labels = rows.map(([, l]) => l);
        const { u, pairs } = pairCount(scores, labels);
        const result = mannWhitney(scores, labels);
        expect(result.u).toBe(u);
        expect(result.positives * result.negatives).toBe(pairs);
        expect(rocAuc(scores, labels)).toBe(u / pairs);
      }),
      { numRuns: 300 },
    );
  });

  it("AUC of the negated scores is 1 − AUC (ties stay ties)", () => {
    fc.assert(
      fc.property(labelledScores, (rows) => {
        const scores = rows.map(([s]) => s);
        const labels = rows.map(([, l]) => l);
        expect(rocAuc(scores.map((s) => -s), labels)).toBeCloseTo(1 - rocAuc(scores, labels), 12);
      }),
    );
  });

  it("perfect separation gives 1, reversed separation 0, all scores tied ½", () => {
    const labels = [false, false, false, true, true];
    expect(rocAuc([1, 2, 3, 4, 5], labels)).toBe(1);
    expect(rocAuc([5, 4, 3, 2, 1], labels)).toBe(0);
    expect(rocAuc([7, 7, 7, 7, 7], labels)).toBe(0.5);
  });

  it("accepts 0/1 labels and typed arrays", () => {
    const scores = new Float64Array([0.1, 0.4, 0.35, 0.8]);
    expect(rocAuc(scores, new Uint8Array([0, 0, 1, 1]))).toBe(0.75);
    expect(mannWhitney(scores, [false, false, true, true])).toEqual({ u: 3, positives: 2, negatives: 2, auc: 0.75 });
  });

  it("refuses unequal lengths, non-finite scores, bad labels and a single class", () => {
    expectLeewayError(() => rocAuc([1, 2, 3], [true, false]), "E_DIMENSION", "labels", "3", "2");
    expectLeewayError(() => rocAuc([1, Number.NaN], [true, false]), "E_NON_FINITE", "scores[1]", "NaN");
    expectLeewayError(() => rocAuc([1, 2], [true, 2 as unknown as boolean]), "E_OPTION", "labels[1]", "2");
    expectLeewayError(() => rocAuc([1, 2], [true, true]), "E_OPTION", "labels", "at least one positive and one negative");
  });
});
