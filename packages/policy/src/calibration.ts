/**
 * Normal levels measured on calibration scores. Scores are compared on the
 * log scale, u = ln(s + floor): reconstruction losses are skewed and
 * multiplicative (a noisier machine scales them), and on the log scale their
 * spread is close to constant across operating modes.
 */

/** Mean and spread of one model's log scores over its calibration span. */
export interface ScoreLevel {
  /** μ: mean of u = ln(s + floor). */
  mean: number;
  /** σ: sample standard deviation of u (never below a small positive floor). */
  spread: number;
}

/** The smallest σ a level may have, so that a model that scores a constant stream cannot divide by zero. */
export const MIN_SPREAD = 1e-6;

/** μ and σ of `us` (the first `n` entries). */
export function levelOf(us: Float64Array, n = us.length): ScoreLevel {
  let mean = 0;
  for (let i = 0; i < n; i++) mean += us[i] as number;
  mean /= n;
  let ss = 0;
  for (let i = 0; i < n; i++) {
    const d = (us[i] as number) - mean;
    ss += d * d;
  }
  const spread = Math.max(MIN_SPREAD, Math.sqrt(ss / Math.max(1, n - 1)));
  return { mean, spread };
}

/** The q-quantile of the first `n` entries of `us` (linear interpolation between order statistics). */
export function quantileOf(us: Float64Array, q: number, n = us.length): number {
  const sorted = us.slice(0, n).sort();
  const h = (n - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return (sorted[lo] as number) + (h - lo) * ((sorted[hi] as number) - (sorted[lo] as number));
}

/** Normalised score z = (u − μ)/σ, clipped to ±clip. */
export function normalised(u: number, level: ScoreLevel, clip: number): number {
  const z = (u - level.mean) / level.spread;
  return z > clip ? clip : z < -clip ? -clip : z;
}
