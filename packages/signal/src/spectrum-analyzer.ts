import { DimensionError, OptionError, oneOf, optionsObject, positiveNumber, requireNumber } from "@leeway/core";
import { frameArgument, refuseNonFiniteResult } from "./sample-checks.js";
import { RealFft, isPowerOfTwo, MAX_FFT_SIZE } from "./real-fft.js";
import { makeWindow, WINDOW_NAMES, type Window, type WindowName } from "./window.js";

/** Options of {@link SpectrumAnalyzer}. */
export interface SpectrumAnalyzerOptions {
  /** N, samples per frame: a power of two ≥ 4. */
  size: number;
  /** Sampling rate f_s in Hz. */
  sampleRate: number;
  /** Analysis window (default `"hann"`). */
  window?: WindowName;
}

/**
 * One-sided spectra of real frames through a window, corrected so that they
 * read in physical units.
 * - amplitude: a_k = c_k·|X_k| / (N·CG), c_k = 2 for 0 < k < N/2 and 1 at DC
 *   and Nyquist, so a sine of amplitude A at an exact bin reads A there;
 * - power: P_k = c_k·|X_k|² / (N²·CG²·ENBW) = c_k·|X_k|² / (N·Σw²), in units²
 *   per bin, so that Σ_k P_k is the frame's mean square for broadband signals
 *   and a sine's main lobe sums to A²/2;
 * - density: P_k / Δf in units²/Hz, Δf = f_s/N.
 * X_k is the DFT of the windowed frame, CG the coherent gain and ENBW the
 * equivalent noise bandwidth in bins (Harris, 1978). Output index k is the
 * bin at frequency k·Δf, k = 0..N/2.
 * @example
 * const sa = new SpectrumAnalyzer({ size: 1024, sampleRate: 5120 });
 * const frame = new Float64Array(1024).map((_, n) => 2 * Math.sin((2 * Math.PI * 100 * n) / 5120));
 * sa.amplitude(frame)[20]; // ≈ 2 (100 Hz is bin 20 at Δf = 5 Hz)
 */
export class SpectrumAnalyzer {
  /** N, samples per frame. */
  readonly size: number;
  /** f_s, Hz. */
  readonly sampleRate: number;
  /** Δf = f_s/N, Hz per bin. */
  readonly binWidth: number;
  /** The number of one-sided bins, N/2 + 1. */
  readonly bins: number;
  /** The window and its correction constants. */
  readonly window: Window;
  readonly #fft: RealFft;
  readonly #work: Float64Array;

  constructor(options: SpectrumAnalyzerOptions) {
    const o = optionsObject<SpectrumAnalyzerOptions>("SpectrumAnalyzer", options, ["size", "sampleRate", "window"]);
    if (!isPowerOfTwo(o.size) || o.size < 4 || o.size > MAX_FFT_SIZE) {
      throw new OptionError("SpectrumAnalyzer", "size", o.size, `a power of two in [4, ${MAX_FFT_SIZE}]`);
    }
    this.size = o.size;
    this.sampleRate = positiveNumber("SpectrumAnalyzer", "sampleRate", o.sampleRate);
    const windowName = o.window === undefined ? "hann" : oneOf("SpectrumAnalyzer", "window", o.window, WINDOW_NAMES);
    this.window = makeWindow(windowName, this.size);
    this.binWidth = this.sampleRate / this.size;
    this.bins = this.size / 2 + 1;
    this.#fft = new RealFft(this.size);
    this.#work = new Float64Array(this.size);
  }

  /** The Nyquist frequency f_s/2 in Hz. */
  get nyquist(): number {
    return this.sampleRate / 2;
  }

  /** The frequency of bin k in Hz, k·Δf. */
  frequency(k: number): number {
    return requireNumber("SpectrumAnalyzer", "k", k) * this.binWidth;
  }

  /**
   * The windowed frame's DFT in the packed layout of {@link RealFft}; the
   * returned array is an internal buffer, overwritten by the next call.
   */
  transform(frame: Float64Array): Float64Array {
    const n = this.size;
    frameArgument("SpectrumAnalyzer", "frame", frame, n);
    const w = this.window.values;
    const work = this.#work;
    for (let i = 0; i < n; i++) work[i] = (frame[i] as number) * (w[i] as number);
    this.#fft.forward(work);
    const check = (work[0] as number) + (work[1] as number);
    if (!Number.isFinite(check)) refuseNonFiniteResult("SpectrumAnalyzer", "frame", frame, "spectrum");
    return work;
  }

  /** One-sided amplitude spectrum (peak units, e.g. m/s²), N/2 + 1 values into `out`. */
  amplitude(frame: Float64Array, out: Float64Array = new Float64Array(this.bins)): Float64Array {
    const d = this.#squaredMagnitudes(frame, out);
    const scale = 1 / (this.size * this.window.coherentGain);
    const last = this.bins - 1;
    out[0] = Math.sqrt(d[0] as number) * scale;
    out[last] = Math.sqrt(d[last] as number) * scale;
    for (let k = 1; k < last; k++) out[k] = 2 * Math.sqrt(d[k] as number) * scale;
    return out;
  }

  /** One-sided power spectrum (units² per bin, ENBW-corrected), N/2 + 1 values into `out`. */
  power(frame: Float64Array, out: Float64Array = new Float64Array(this.bins)): Float64Array {
    const d = this.#squaredMagnitudes(frame, out);
    // 1/(N·Σw²) = 1/(N²·powerGain)
    const scale = 1 / (this.size * this.size * this.window.powerGain);
    const last = this.bins - 1;
    out[0] = (d[0] as number) * scale;
    out[last] = (d[last] as number) * scale;
    for (let k = 1; k < last; k++) out[k] = 2 * (d[k] as number) * scale;
    return out;
  }

  /** One-sided power spectral density (units²/Hz), N/2 + 1 values into `out`. */
  density(frame: Float64Array, out: Float64Array = new Float64Array(this.bins)): Float64Array {
    this.power(frame, out);
    const inv = 1 / this.binWidth;
    let total = 0;
    for (let k = 0; k < out.length; k++) total += out[k] = (out[k] as number) * inv;
    if (!(total < Infinity)) refuseNonFiniteResult("SpectrumAnalyzer", "frame", frame, "power spectral density");
    return out;
  }

  /** |X_k|² for k = 0..N/2 into `out`. */
  #squaredMagnitudes(frame: Float64Array, out: Float64Array): Float64Array {
    if (out.length !== this.bins) throw new DimensionError("SpectrumAnalyzer", "out", this.bins, out.length);
    const d = this.transform(frame);
    const last = this.bins - 1;
    const dc = d[0] as number;
    const nyq = d[1] as number;
    let total = 0;
    for (let k = 1; k < last; k++) {
      const re = d[2 * k] as number;
      const im = d[2 * k + 1] as number;
      total += out[k] = re * re + im * im;
    }
    out[0] = dc * dc;
    out[last] = nyq * nyq;
    // |X_k|² overflows for samples far beyond SIGNAL_SAFE_MAGNITUDE: refused rather than returned as Infinity
    if (!(total + out[0] + out[last] < Infinity)) refuseNonFiniteResult("SpectrumAnalyzer", "frame", frame, "squared magnitude spectrum");
    return out;
  }
}
