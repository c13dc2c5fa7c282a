import { NonFiniteError, OptionError } from "@leeway/core";
import { frameArgument } from "./sample-checks.js";

/** Time-domain condition indicators of one frame. */
export interface TimeFeatures {
  /** Arithmetic mean. */
  mean: number;
  /** Root mean square √((1/N)·Σx²), about zero (not mean-removed), in signal units. */
  rms: number;
  /** Peak, max |x|. */
  peak: number;
  /** Crest factor, peak / rms (√2 for a sine). */
  crestFactor: number;
  /** Skewness m₃ / m₂^{3/2} of the mean-removed samples (0 for symmetric signals). */
  skewness: number;
  /** Kurtosis m₄ / m₂² of the mean-removed samples (not excess: 3 for Gaussian noise, 1.5 for a sine). */
  kurtosis: number;
}

/**
 * RMS, peak, crest factor, skewness and kurtosis of a frame in two passes
 * (mean, then central moments m_p = (1/N)·Σ(x − x̄)^p; population moments).
 * Kurtosis is the plain fourth standardised moment (Pearson), not the excess.
 * Method: standard moment definitions (common practice, no source); their use
 * as vibration indicators is common practice in condition monitoring.
 * A constant frame has skewness 0 and kurtosis 0 by convention here (m₂ = 0,
 * or so small against the peak that m₂² underflows).
 * Every finite frame gives finite features (huge samples are scaled by an
 * exact power of two first); NaN/±Infinity are refused with E_NON_FINITE and
 * non-numbers in a plain array with E_SAMPLE.
 * @example
 * const sine = new Float64Array(1000).map((_, n) => Math.sin((2 * Math.PI * 10 * n) / 1000));
 * timeFeatures(sine).crestFactor; // ≈ 1.41421 (√2)
 * timeFeatures(sine).kurtosis; // ≈ 1.5
 */
export function timeFeatures(frame: Float64Array): TimeFeatures {
  const xs = frameArgument("timeFeatures", "frame", frame);
  if (xs.length === 0) throw new OptionError("timeFeatures", "frame", frame, "a non-empty Float64Array");
  let peak = 0;
  for (let i = 0; i < xs.length; i++) {
    const a = Math.abs(xs[i] as number);
    if (a > peak) peak = a;
  }
  if (!(peak < Infinity)) {
    for (let i = 0; i < xs.length; i++) if (!Number.isFinite(xs[i] as number)) throw new NonFiniteError("timeFeatures", `frame[${i}]`, xs[i]);
  }
  // Beyond 2^240 the sums of fourth powers could overflow, below 2^-240 they
  // underflow: the moments are then taken of x·2^−e (e the binary exponent of
  // the peak, clamped to [-1000, 1023]: an exact scaling) and mean and rms
  // scaled back; skewness, kurtosis and crest factor do not depend on the scale.
  const outside = peak > 2 ** 240 || (peak > 0 && peak < 2 ** -240);
  const exponent = outside ? Math.max(-1000, Math.min(1023, Math.floor(Math.log2(peak)))) : 0; // log2 rounds up to 1024 near the top
  return scaledFeatures(xs, 2 ** -exponent, 2 ** exponent);
}

function scaledFeatures(xs: ArrayLike<number>, scale: number, unscale: number): TimeFeatures {
  const n = xs.length;
  let sum = 0;
  let sumSquares = 0;
  let peak = 0;
  for (let i = 0; i < n; i++) {
    const x = (xs[i] as number) * scale;
    sum += x;
    sumSquares += x * x;
    const a = Math.abs(x);
    if (a > peak) peak = a;
  }
  const mean = sum / n;
  let m2 = 0;
  let m3 = 0;
  let m4 = 0;
  for (let i = 0; i < n; i++) {
    const d = (xs[i] as number) * scale - mean;
    const d2 = d * d;
    m2 += d2;
    m3 += d2 * d;
    m4 += d2 * d2;
  }
  m2 /= n;
  m3 /= n;
  m4 /= n;
  // rms ≤ peak holds exactly; the clamp keeps a rounded-up square root of a sample near the top of the double range finite
  const rms = Math.min(Math.sqrt(sumSquares / n), peak);
  return {
    mean: mean * unscale,
    rms: rms * unscale,
    peak: peak * unscale,
    crestFactor: rms > 0 ? peak / rms : 0,
    // a spread so small that m₂^{3/2} or m₂² underflows counts as a constant frame
    skewness: Math.pow(m2, 1.5) > 0 ? m3 / Math.pow(m2, 1.5) : 0,
    kurtosis: m2 * m2 > 0 ? m4 / (m2 * m2) : 0,
  };
}

/** Root mean square of a frame, √((1/N)·Σx²). @example rms(Float64Array.from([3, -3])); // 3 */
export function rms(frame: Float64Array): number {
  return timeFeatures(frame).rms;
}

/** Peak magnitude max |x| of a frame. @example peak(Float64Array.from([1, -4, 2])); // 4 */
export function peak(frame: Float64Array): number {
  return timeFeatures(frame).peak;
}

/** Crest factor peak / rms of a frame. @example crestFactor(Float64Array.from([1, -1, 1, -1])); // 1 */
export function crestFactor(frame: Float64Array): number {
  return timeFeatures(frame).crestFactor;
}

/** Skewness m₃ / m₂^{3/2} of a frame. @example skewness(Float64Array.from([1, 2, 3])); // 0 */
export function skewness(frame: Float64Array): number {
  return timeFeatures(frame).skewness;
}

/** Kurtosis m₄ / m₂² of a frame (3 for Gaussian noise). @example kurtosis(Float64Array.from([1, -1, 1, -1])); // 1 */
export function kurtosis(frame: Float64Array): number {
  return timeFeatures(frame).kurtosis;
}
