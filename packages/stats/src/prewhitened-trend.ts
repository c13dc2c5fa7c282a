import { finiteSamples, OptionError } from "@leeway/core";
import { mannKendallVariance, mannKendallZ, theilSenOfSeries, tieSum } from "./mann-kendall.js";
import { normalSurvival } from "./normal-tail.js";

/** The Mann–Kendall test of a pre-whitened series. */
export interface PrewhitenedTrendResult {
  /** Points in the series given (the pre-whitened series has n − 1). */
  n: number;
  /** Lag-1 sample autocorrelation of the series (about its mean). */
  r1: number;
  /** φ̂ = (n·r1 + 1)/(n − 3), the bias-corrected AR(1) coefficient removed, clipped to [0, 0.99]. */
  phi: number;
  /** Mann–Kendall S of y_t = x_t − φ̂·x_{t−1}. */
  s: number;
  /** Var(S) of the n − 1 pre-whitened points (tie-corrected). */
  variance: number;
  /** z = (S − sign S)/√Var(S). */
  z: number;
  /** Two-sided p-value. */
  pValue: number;
  /** One-sided p-value of a rising trend, P(Z > z). */
  pRising: number;
  /** Theil–Sen slope per step of the series given (the effect size; pre-whitening shrinks the trend it tests to (1 − φ̂)·slope). */
  slope: number;
}

const NAME = "mannKendallPrewhitened";
const MAX_PHI = 0.99;

/**
 * Mann–Kendall trend test that holds its level on autocorrelated series, by
 * pre-whitening (Kulkarni & von Storch, 1995): the lag-1 autocorrelation r1
 * of the series is corrected for its small-sample bias,
 * E[r1] ≈ φ − (1 + 3φ)/n (Marriott & Pope, 1954; from memory), to
 * φ̂ = (n·r1 + 1)/(n − 3), clipped to [0, 0.99]; the test runs on
 * y_t = x_t − φ̂·x_{t−1}. r1 is taken from the series itself, not from the
 * series detrended by its Theil–Sen slope: over a short window the slope of
 * a persistent series soaks up part of its wander, which lowers r1 and let
 * 23 % of trendless AR(1) series with φ = 0.98 (240 points) through at 5 %.
 * Nor is the trend added back as in trend-free pre-whitening (Yue et al.,
 * 2002): adding the estimated slope back re-creates the spurious trend and
 * rejected 29–96 % of those series at 5 % in our checks. On AR(1) noise with
 * φ = 0.5, 0.9 and 0.98 this test stays within twice its nominal level. The
 * price is power: a real trend raises r1 and enters y with slope (1 − φ̂)·β,
 * so on strongly autocorrelated series only a trend that is large against
 * the noise is found. Needs at least 5 points. O(n²) time.
 * @example
 * const r = mannKendallPrewhitened([1.0, 1.2, 0.9, 1.4, 1.6, 1.3, 1.9, 2.1, 1.8, 2.4]);
 * [r.n, r.s > 0, r.phi > 0]; // [10, true, true]: the rise itself raises r1, so part of it is whitened away
 */
export function mannKendallPrewhitened(values: ArrayLike<number>): PrewhitenedTrendResult {
  const xs = finiteSamples(NAME, "values", values);
  const n = xs.length;
  if (n < 5) throw new OptionError(NAME, "values", n, "a series of at least 5 points");
  const slope = theilSenOfSeries(xs);
  const r1 = lagOneAutocorrelation(xs);
  const phi = Math.min(MAX_PHI, Math.max(0, (n * r1 + 1) / (n - 3)));
  const ys = new Float64Array(n - 1);
  for (let t = 1; t < n; t++) ys[t - 1] = (xs[t] as number) - phi * (xs[t - 1] as number);
  let s = 0;
  for (let i = 0; i < ys.length; i++) {
    const yi = ys[i] as number;
    for (let j = i + 1; j < ys.length; j++) s += Math.sign((ys[j] as number) - yi);
  }
  const variance = mannKendallVariance(ys.length, tieSum(ys));
  const { z, pValue } = mannKendallZ(s, variance);
  return { n, r1, phi, s, variance, z, pValue, pRising: normalSurvival(z), slope };
}

/** r1 = Σ_t (x_t − x̄)(x_{t−1} − x̄) / Σ_t (x_t − x̄)². */
function lagOneAutocorrelation(xs: Float64Array): number {
  const n = xs.length;
  let mean = 0;
  for (let t = 0; t < n; t++) mean += xs[t] as number;
  mean /= n;
  let c0 = 0;
  let c1 = 0;
  let previous = 0;
  for (let t = 0; t < n; t++) {
    const d = (xs[t] as number) - mean;
    c0 += d * d;
    if (t > 0) c1 += d * previous;
    previous = d;
  }
  return c0 > 0 ? c1 / c0 : 0;
}
