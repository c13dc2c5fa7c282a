import { finiteSamples } from "@leeway/core";
import { medianInPlace } from "./select.js";
import { normalSurvival } from "./normal-tail.js";

/** The Mann–Kendall trend test of a series. */
export interface MannKendallResult {
  /** Points in the series. */
  n: number;
  /** S = Σ_{i<j} sign(x_j − x_i): positive for a rising series. */
  s: number;
  /** Var(S) = [n(n−1)(2n+5) − Σ_g t_g(t_g−1)(2t_g+5)]/18, t_g the sizes of groups of tied values. */
  variance: number;
  /** z = (S − sign S)/√Var(S), with the continuity correction; 0 when S = 0 or Var(S) = 0. */
  z: number;
  /** Two-sided p-value 2·P(Z > |z|) under no trend. */
  pValue: number;
}

/**
 * z and the two-sided p-value of a Mann–Kendall S with variance `variance`
 * (Mann, 1945; Kendall, 1975): z = (S − 1)/√V for S > 0, (S + 1)/√V for
 * S < 0, 0 for S = 0; p = 2·P(Z > |z|).
 */
export function mannKendallZ(s: number, variance: number): { z: number; pValue: number } {
  if (s === 0 || !(variance > 0)) return { z: 0, pValue: 1 };
  const z = (s > 0 ? s - 1 : s + 1) / Math.sqrt(variance);
  return { z, pValue: Math.min(1, 2 * normalSurvival(Math.abs(z))) };
}

/** Var(S) = [n(n−1)(2n+5) − ties]/18, with ties = Σ_g t_g(t_g−1)(2t_g+5). */
export function mannKendallVariance(n: number, ties: number): number {
  return (n * (n - 1) * (2 * n + 5) - ties) / 18;
}

/** f(t) = t(t−1)(2t+5), one tie group's term in Var(S). */
export function tieTerm(t: number): number {
  return t * (t - 1) * (2 * t + 5);
}

/**
 * The Mann–Kendall test for a monotone trend in a series taken at equal
 * steps (Mann, 1945; Kendall, 1975), with the tie-corrected variance and the
 * continuity-corrected normal approximation. O(n²) time; for a sliding
 * window use {@link WindowTrend}.
 *
 * @example
 * mannKendall([1, 2, 3, 4, 5]).s; // 10
 */
export function mannKendall(values: ArrayLike<number>): MannKendallResult {
  const xs = finiteSamples("mannKendall", "values", values);
  const n = xs.length;
  let s = 0;
  for (let i = 0; i < n; i++) {
    const xi = xs[i] as number;
    for (let j = i + 1; j < n; j++) s += Math.sign((xs[j] as number) - xi);
  }
  const variance = mannKendallVariance(n, tieSum(xs));
  return { n, s, variance, ...mannKendallZ(s, variance) };
}

/**
 * The Theil–Sen slope of a series at unit steps: the median of the pairwise
 * slopes (x_j − x_i)/(j − i) over all i < j (Theil, 1950; Sen, 1968). Robust
 * to up to 29 % wild points. O(n²) time and memory; NaN below two points.
 *
 * @example
 * theilSenSlope([1, 3, 5, 100, 9]); // 2
 */
export function theilSenSlope(values: ArrayLike<number>): number {
  return theilSenOfSeries(finiteSamples("theilSenSlope", "values", values));
}

/** Theil–Sen slope of an already validated series. */
export function theilSenOfSeries(xs: Float64Array): number {
  const n = xs.length;
  if (n < 2) return Number.NaN;
  const slopes = new Float64Array((n * (n - 1)) / 2);
  let p = 0;
  for (let i = 0; i < n; i++) {
    const xi = xs[i] as number;
    for (let j = i + 1; j < n; j++) slopes[p++] = ((xs[j] as number) - xi) / (j - i);
  }
  return medianInPlace(slopes);
}

/** Σ_g t_g(t_g−1)(2t_g+5) over groups of equal values. */
export function tieSum(xs: Float64Array): number {
  const sorted = Float64Array.from(xs).sort();
  let ties = 0;
  let run = 1;
  for (let i = 1; i <= sorted.length; i++) {
    if (i < sorted.length && sorted[i] === sorted[i - 1]) {
      run++;
    } else {
      if (run > 1) ties += tieTerm(run);
      run = 1;
    }
  }
  return ties;
}

