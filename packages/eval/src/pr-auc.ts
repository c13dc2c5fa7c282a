import { splitScores, type SplitScores } from "./split-scores.js";

/**
 * Area under the precision–recall curve as average precision, exact:
 *
 *   AP = Σₜ (Rₜ − Rₜ₋₁)·Pₜ
 *
 * over the distinct score values t in decreasing order, where Rₜ (recall) and
 * Pₜ (precision) count every sample scoring ≥ t as flagged. Samples with tied
 * scores enter together at one threshold, so the result does not depend on
 * the order of ties. This is the step-wise (non-interpolated) estimator of
 * the PR area (Boyd, Eng & Page, 2013; Manning, Raghavan & Schütze, 2008, §8.4).
 * Its value for a random ranking is about the positive fraction, not ½.
 * @param scores one finite score per sample; higher = more abnormal.
 * @param labels one flag per sample, true (or 1) for a positive sample.
 * @example
 * prAuc([0.1, 0.4, 0.35, 0.8], [false, false, true, true]);
 * // thresholds 0.8 (R ½, P 1), 0.4 (R ½), 0.35 (R 1, P ⅔): ½·1 + ½·⅔ = 0.8333…
 */
export function prAuc(scores: ArrayLike<number>, labels: ArrayLike<boolean | number>): number {
  return averagePrecisionSorted(splitScores("prAuc", scores, labels));
}

/** {@link prAuc} of scores already split by label and sorted ascending. */
export function averagePrecisionSorted({ positives, negatives }: SplitScores): number {
  const total = positives.length;
  let i = positives.length - 1; // walks positives from the top
  let j = negatives.length - 1; // walks negatives from the top
  let truePositives = 0;
  let flagged = 0;
  let area = 0;
  while (i >= 0) {
    // t: the next distinct score from the top, over both groups
    const p = positives[i] as number;
    const t = j >= 0 && (negatives[j] as number) > p ? (negatives[j] as number) : p;
    let tied = 0;
    while (i >= 0 && (positives[i] as number) === t) {
      tied++;
      i--;
    }
    while (j >= 0 && (negatives[j] as number) === t) {
      flagged++;
      j--;
    }
    truePositives += tied;
    flagged += tied;
    if (tied > 0) area += tied * (truePositives / flagged); // ΔR·P with ΔR = tied / total, divided out below
  }
  return Math.min(1, area / total);
}
