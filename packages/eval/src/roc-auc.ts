import { splitScores, type SplitScores } from "./split-scores.js";

/** The Mann–Whitney statistic of positive over negative scores and the ROC AUC it equals. */
export interface MannWhitney {
  /** U = Σ over (positive, negative) pairs of [s⁺ > s⁻] + ½·[s⁺ = s⁻]. */
  u: number;
  /** Number of positive samples n₁. */
  positives: number;
  /** Number of negative samples n₀. */
  negatives: number;
  /** U / (n₁·n₀): the probability that a random positive outscores a random negative, ties counted ½. */
  auc: number;
}

/**
 * The Mann–Whitney U statistic of the positive samples' scores over the
 * negative samples' scores, with ties counted ½, and the area under the ROC
 * curve it equals (Bamber, 1975; Hanley & McNeil, 1982): AUC = U / (n₁·n₀).
 *
 * Method: both groups are sorted (O(n log n)); one merge pass counts, for each
 * positive score s, the negatives below s (L) and equal to s (E), and adds
 * L + E/2. Exact in float64 up to 2^53 pairs.
 * @param scores one finite score per sample; higher = more abnormal.
 * @param labels one flag per sample, true (or 1) for a positive (abnormal) sample.
 * @example
 * mannWhitney([0.1, 0.4, 0.35, 0.8], [false, false, true, true]);
 * // { u: 3, positives: 2, negatives: 2, auc: 0.75 }
 */
export function mannWhitney(scores: ArrayLike<number>, labels: ArrayLike<boolean | number>): MannWhitney {
  return mannWhitneySorted(splitScores("mannWhitney", scores, labels));
}

/** {@link mannWhitney} of scores already split by label and sorted ascending. */
export function mannWhitneySorted({ positives, negatives }: SplitScores): MannWhitney {
  const n1 = positives.length;
  const n0 = negatives.length;
  let u = 0;
  let below = 0; // L: negatives strictly below the current positive score
  let upTo = 0; //  L + E: negatives at or below it
  for (let i = 0; i < n1; i++) {
    const s = positives[i] as number;
    while (below < n0 && (negatives[below] as number) < s) below++;
    if (upTo < below) upTo = below;
    while (upTo < n0 && (negatives[upTo] as number) <= s) upTo++;
    u += below + 0.5 * (upTo - below);
  }
  return { u, positives: n1, negatives: n0, auc: u / (n1 * n0) };
}

/**
 * Area under the ROC curve of scores against binary labels, exact, ties
 * counted ½ (the Mann–Whitney statistic divided by n₁·n₀; Hanley & McNeil, 1982).
 * Equals the trapezoidal area under the empirical ROC curve whose steps join
 * the tied groups by straight segments.
 * @example
 * rocAuc([0.1, 0.4, 0.35, 0.8], [false, false, true, true]); // 0.75
 */
export function rocAuc(scores: ArrayLike<number>, labels: ArrayLike<boolean | number>): number {
  return mannWhitney(scores, labels).auc;
}
