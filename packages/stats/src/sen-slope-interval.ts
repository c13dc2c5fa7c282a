import { finiteSamples, numberInRange, OptionError } from "@leeway/core";
import { kendallUpperTail } from "./kendall-distribution.js";
import { mannKendallVariance, tieSum } from "./mann-kendall.js";
import { normalQuantile } from "./normal-quantile.js";

/** The longest series {@link senSlopeInterval} takes (it sorts n(n−1)/2 pairwise slopes: 8.4 million at 4096). */
export const SEN_INTERVAL_MAX_N = 4096;

/** Series up to this length without tied values get the exact Kendall critical value; longer or tied ones the normal one. */
export const SEN_EXACT_UP_TO = 60;

/** Options of {@link senSlopeInterval}. */
export interface SenSlopeIntervalOptions {
  /** Two-sided confidence level 1 − α, in (0, 1) (default 0.9). */
  confidence?: number;
}

/** A Theil–Sen slope with its distribution-free confidence interval. */
export interface SenSlopeInterval {
  /** Points in the series. */
  n: number;
  /** N = n(n−1)/2 pairwise slopes. */
  pairs: number;
  /** The Theil–Sen slope: the median pairwise slope, per step. */
  slope: number;
  /** Lower end of the interval, per step (−Infinity when n is too small for the level). */
  lower: number;
  /** Upper end of the interval, per step (+Infinity when n is too small for the level). */
  upper: number;
  /** The confidence level asked for. */
  confidence: number;
  /** The level the interval actually has under no ties: ≥ `confidence` for `"exact"`, approximate for `"normal"`. */
  attained: number;
  /** `"exact"`: critical value from the exact Kendall distribution; `"normal"`: from z·√Var(S), tie-corrected. */
  method: "exact" | "normal";
}

/**
 * The Theil–Sen slope of a series at equal steps and Sen's confidence interval for it
 * (Sen, 1968; Hollander & Wolfe, 1999, §9.4; Gilbert, 1987, §16.5). With the N pairwise
 * slopes sorted, d₍₁₎ ≤ … ≤ d₍N₎, and C the two-sided critical value of the Mann–Kendall S
 * (P(|S| > C) ≤ α), the interval is [d₍M₁₎, d₍M₂₊₁₎] with M₁ = (N − C)/2, M₂ = (N + C)/2:
 * exactly the slopes b for which the detrended series x_i − b·i shows no trend at level α.
 * C comes from the exact Kendall distribution for up to {@link SEN_EXACT_UP_TO} values
 * without ties, else C = z_{1−α/2}·√Var(S) with the tie-corrected variance, and a
 * fractional rank is interpolated between its neighbours. O(n² log n) time, O(n²) memory.
 *
 * @example
 * const r = senSlopeInterval([1.0, 2.2, 2.9, 4.3, 4.8, 6.1, 7.2, 7.9, 9.3, 9.9], { confidence: 0.9 });
 * [r.slope.toFixed(3), r.lower.toFixed(3), r.upper.toFixed(3), r.method]; // ["1.000", "0.933", "1.100", "exact"]
 */
export function senSlopeInterval(values: ArrayLike<number>, options: SenSlopeIntervalOptions = {}): SenSlopeInterval {
  const confidence = confidenceOption("senSlopeInterval", options);
  const xs = finiteSamples("senSlopeInterval", "values", values);
  const n = xs.length;
  if (n < 2) throw new OptionError("senSlopeInterval", "values", `${n} values`, "a series of at least 2 finite numbers");
  if (n > SEN_INTERVAL_MAX_N) throw new OptionError("senSlopeInterval", "values", `${n} values`, `a series of at most ${SEN_INTERVAL_MAX_N} values`);
  const slopes = sortedPairwiseSlopes(xs);
  const pairs = slopes.length;
  const alpha = 1 - confidence;
  const ties = tieSum(xs);
  let c: number; // the critical value C of S
  let method: SenSlopeInterval["method"];
  let attained: number;
  if (n <= SEN_EXACT_UP_TO && ties === 0) {
    ({ c, attained } = exactCriticalValue(n, pairs, alpha));
    method = "exact";
  } else {
    c = normalQuantile(1 - alpha / 2) * Math.sqrt(mannKendallVariance(n, ties));
    attained = confidence;
    method = "normal";
  }
  return {
    n,
    pairs,
    slope: rankValue(slopes, (pairs + 1) / 2),
    lower: rankValue(slopes, (pairs - c) / 2),
    upper: rankValue(slopes, (pairs + c) / 2 + 1),
    confidence,
    attained,
    method,
  };
}

/** Validates the `confidence` option (default 0.9). */
export function confidenceOption(component: string, options: { confidence?: number }): number {
  if (options === null || typeof options !== "object") throw new OptionError(component, "options", options, "an options object");
  if (options.confidence === undefined) return 0.9;
  return numberInRange(component, "confidence", options.confidence, { min: 0, max: 1, minExclusive: true, maxExclusive: true });
}

/** The slopes (x_j − x_i)/(j − i), i < j, sorted ascending. */
function sortedPairwiseSlopes(xs: Float64Array): Float64Array {
  const n = xs.length;
  const slopes = new Float64Array((n * (n - 1)) / 2);
  let p = 0;
  for (let i = 0; i < n; i++) {
    const xi = xs[i] as number;
    for (let j = i + 1; j < n; j++) slopes[p++] = ((xs[j] as number) - xi) / (j - i);
  }
  return slopes.sort();
}

/**
 * The smallest C of the parity of N with P(S > C) ≤ α/2 under the exact null distribution,
 * and the level 1 − 2·P(S > C) it attains. C = N when no smaller value reaches the level.
 */
function exactCriticalValue(n: number, pairs: number, alpha: number): { c: number; attained: number } {
  const tail = kendallUpperTail(n); // tail[k] = P(S ≥ N − 2k)
  // P(S > N − 2k) = P(S ≥ N − 2(k − 1)) = tail[k − 1]; take the largest k with tail[k − 1] ≤ α/2.
  let k = 0;
  while (k + 1 <= pairs && (tail[k] as number) <= alpha / 2) k++;
  const outside = k === 0 ? 0 : (tail[k - 1] as number);
  return { c: pairs - 2 * k, attained: 1 - 2 * outside };
}

/** The value at 1-based rank r of sorted values, interpolating a fractional rank; ±Infinity outside [1, N]. */
function rankValue(sorted: Float64Array, r: number): number {
  if (r < 1) return -Infinity;
  if (r > sorted.length) return Infinity;
  const lo = Math.floor(r);
  const frac = r - lo;
  const a = sorted[lo - 1] as number;
  return frac === 0 ? a : a + frac * ((sorted[lo] as number) - a);
}
