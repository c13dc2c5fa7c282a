import { DimensionError, OptionError, nonNegativeNumber, positiveNumber } from "@leeway/core";
import { frameArgument, refuseNonFiniteResult } from "./sample-checks.js";

/**
 * Velocity amplitude spectrum from a one-sided acceleration amplitude
 * spectrum (m/s², bins k·Δf for k = 0..K−1), by integration in the frequency
 * domain: v_k = a_k / (2π·f_k), f_k = k·Δf, reported in mm/s. Bins below
 * `lowCut` (and DC) are set to zero, since 1/f would amplify low-frequency
 * noise without bound.
 * Method: integration of a sinusoid, v = a/ω (common practice, no source).
 * @param acceleration one-sided amplitude spectrum in m/s² (e.g. from SpectrumAnalyzer.amplitude)
 * @param binWidth Δf in Hz
 * @param lowCut lowest frequency kept, Hz (≥ 0; DC is always dropped)
 * @example
 * // 10 m/s² at 100 Hz (bin 20 at Δf = 5 Hz)
 * const a = new Float64Array(513); a[20] = 10;
 * velocitySpectrum(a, 5, 10)[20]; // ≈ 15.915 (mm/s peak)
 */
export function velocitySpectrum(acceleration: Float64Array, binWidth: number, lowCut: number, out: Float64Array = new Float64Array(acceleration.length)): Float64Array {
  const df = positiveNumber("velocitySpectrum", "binWidth", binWidth);
  const cut = nonNegativeNumber("velocitySpectrum", "lowCut", lowCut);
  frameArgument("velocitySpectrum", "acceleration", acceleration);
  if (out.length !== acceleration.length) throw new DimensionError("velocitySpectrum", "out", acceleration.length, out.length);
  out[0] = 0;
  let check = 0;
  for (let k = 1; k < acceleration.length; k++) {
    const f = k * df;
    // v = a / (2πf), m/s → mm/s
    const v = f < cut ? 0 : ((acceleration[k] as number) / (2 * Math.PI * f)) * 1000;
    out[k] = v;
    check += v - v; // NaN once a value is NaN or ±Infinity
  }
  if (check !== 0) refuseNonFiniteResult("velocitySpectrum", "acceleration", acceleration, "velocity");
  return out;
}

/**
 * Velocity RMS in mm/s from a one-sided acceleration power spectrum
 * ((m/s²)² per bin, ENBW-corrected, as SpectrumAnalyzer.power returns):
 * v_rms = 1000·√(Σ_{f_k ≥ lowCut} P_k / (2π·f_k)²).
 * Method: Parseval's theorem applied to the integrated spectrum (common practice, no source).
 * @param power one-sided acceleration power spectrum in (m/s²)² per bin
 * @param binWidth Δf in Hz
 * @param lowCut lowest frequency kept, Hz (for example 10 Hz, the usual lower limit of velocity severity bands)
 * @example
 * // a 10 m/s² sine at 100 Hz has mean square 50 (m/s²)²
 * const p = new Float64Array(513); p[20] = 50;
 * velocityRms(p, 5, 10); // ≈ 11.254 (mm/s)
 */
export function velocityRms(power: Float64Array, binWidth: number, lowCut: number): number {
  const df = positiveNumber("velocityRms", "binWidth", binWidth);
  const cut = nonNegativeNumber("velocityRms", "lowCut", lowCut);
  if (frameArgument("velocityRms", "power", power).length < 2) throw new OptionError("velocityRms", "power", power, "a Float64Array of at least 2 bins");
  let sum = 0;
  for (let k = 1; k < power.length; k++) {
    const f = k * df;
    if (f < cut) continue;
    const w = 2 * Math.PI * f;
    sum += (power[k] as number) / (w * w);
  }
  const vrms = Math.sqrt(sum) * 1000;
  if (!Number.isFinite(vrms)) refuseNonFiniteResult("velocityRms", "power", power, "velocity RMS");
  return vrms;
}
