import { OptionError, integerInRange, numberInRange } from "@leeway/core";

/** A two-sided confidence interval for a Poisson mean. */
export interface PoissonInterval {
  /** Confidence level, for example 0.95. */
  level: number;
  /** Lower bound μ_L (0 when the count is 0). */
  lower: number;
  /** Upper bound μ_U. */
  upper: number;
}

/**
 * The exact (Garwood, 1936) two-sided confidence interval for the mean μ of a
 * Poisson count k: μ_L solves P(X ≥ k | μ_L) = α/2 and μ_U solves
 * P(X ≤ k | μ_U) = α/2, with α = 1 − level; equivalently
 * μ_L = ½·χ²(α/2; 2k) and μ_U = ½·χ²(1 − α/2; 2k + 2).
 *
 * Method: bisection on the Poisson distribution function, summed outward
 * from its largest term e^(−μ)·μ^j / j! (until the terms fall below 1e-18 of
 * the sum), to a relative width of 1e-12.
 * @param count k, the observed number of events (an integer ≥ 0).
 * @param level confidence level in (0, 1).
 * @example
 * poissonInterval(0, 0.95).upper; // 3.6888… (= ln 40)
 * poissonInterval(1, 0.95);       // { level: 0.95, lower: 0.02532…, upper: 5.5716… }
 */
export function poissonInterval(count: number, level = 0.95): PoissonInterval {
  const k = integerInRange("poissonInterval", "count", count, 0, 1e7);
  const confidence = numberInRange("poissonInterval", "level", level, { min: 0, max: 1, minExclusive: true, maxExclusive: true });
  const tail = (1 - confidence) / 2;
  // P(X ≤ k | μ) falls from 1 to 0 as μ grows.
  const upper = solveDecreasing((mu) => poissonCdf(k, mu), tail, k + 1);
  // P(X ≥ k | μ) = 1 − P(X ≤ k − 1 | μ) rises with μ.
  const lower = k === 0 ? 0 : solveDecreasing((mu) => poissonCdf(k - 1, mu), 1 - tail, k);
  return { level: confidence, lower, upper };
}

/** P(X ≤ k) for X ~ Poisson(μ), summed in log space from the largest term. */
export function poissonCdf(k: number, mu: number): number {
  if (!(mu >= 0)) throw new OptionError("poissonCdf", "mu", mu, "a finite number >= 0");
  if (mu === 0) return 1;
  // log t_j = −μ + j·ln μ − ln j!, largest at j = min(k, ⌊μ⌋)
  const logMu = Math.log(mu);
  const peak = Math.min(k, Math.floor(mu));
  const logPeak = -mu + peak * logMu - logFactorial(peak);
  let sum = 1; // Σ t_j / t_peak
  let ratio = 1;
  for (let j = peak; j > 0; j--) {
    ratio *= j / mu; // t_{j−1} / t_peak
    sum += ratio;
    if (ratio < 1e-18 * sum) break;
  }
  ratio = 1;
  for (let j = peak + 1; j <= k; j++) {
    ratio *= mu / j;
    sum += ratio;
    if (ratio < 1e-18 * sum) break;
  }
  return Math.min(1, Math.exp(logPeak + Math.log(sum)));
}

const SMALL_FACTORIALS = 256;
const LOG_FACTORIALS = (() => {
  const table = new Float64Array(SMALL_FACTORIALS);
  for (let n = 1; n < SMALL_FACTORIALS; n++) table[n] = (table[n - 1] as number) + Math.log(n);
  return table;
})();

// ln n!: a table below 256, above it Stirling's series to the n⁻⁵ term (error < 1e-16 relative there).
function logFactorial(n: number): number {
  if (n < SMALL_FACTORIALS) return LOG_FACTORIALS[n] as number;
  const inv = 1 / n;
  const inv2 = inv * inv;
  return n * Math.log(n) - n + 0.5 * Math.log(2 * Math.PI * n) + inv * (1 / 12 - inv2 * (1 / 360 - inv2 / 1260));
}

// Finds μ > 0 with f(μ) = target for a decreasing f, starting from a scale hint.
function solveDecreasing(f: (mu: number) => number, target: number, hint: number): number {
  let low = 0;
  let high = Math.max(1, hint);
  while (f(high) > target) {
    low = high;
    high *= 2;
  }
  while (high - low > 1e-12 * high) {
    const mid = 0.5 * (low + high);
    if (f(mid) > target) low = mid;
    else high = mid;
  }
  return 0.5 * (low + high);
}
