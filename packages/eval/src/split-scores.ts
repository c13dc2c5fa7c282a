import { DimensionError, NonFiniteError, OptionError } from "@leeway/core";
import { toFlags } from "./labels.js";
import { sortFloat64 } from "./sort-float64.js";

/** Scores of the positive and of the negative samples, each sorted ascending. */
export interface SplitScores {
  positives: Float64Array;
  negatives: Float64Array;
}

/**
 * Splits scores by their labels (true or 1 = positive) and sorts each part
 * ascending. Refuses unequal lengths, non-finite scores, and labels without at
 * least one positive and one negative (no area is defined then). The sort is
 * {@link sortFloat64}, O(n).
 */
export function splitScores(component: string, scores: ArrayLike<number>, labels: ArrayLike<boolean | number>): SplitScores {
  if (labels.length !== scores.length) throw new DimensionError(component, "labels", scores.length, labels.length);
  const flags = toFlags(component, "labels", labels);
  let positiveCount = 0;
  for (let i = 0; i < flags.length; i++) if (flags[i]) positiveCount++;
  const negativeCount = flags.length - positiveCount;
  if (positiveCount === 0 || negativeCount === 0) {
    throw new OptionError(component, "labels", `${positiveCount} positive and ${negativeCount} negative`, "at least one positive and one negative label");
  }
  const positives = new Float64Array(positiveCount);
  const negatives = new Float64Array(negativeCount);
  let p = 0;
  let q = 0;
  for (let i = 0; i < scores.length; i++) {
    const s = scores[i] as number;
    if (typeof s !== "number" || !Number.isFinite(s)) throw new NonFiniteError(component, `scores[${i}]`, s);
    if (flags[i]) positives[p++] = s;
    else negatives[q++] = s;
  }
  sortFloat64(positives);
  sortFloat64(negatives);
  return { positives, negatives };
}
