import { OptionError, finiteSamples, integerInRange, numberInRange, optionsObject } from "@leeway/core";

/** How {@link decimate} filters before it keeps every `factor`-th sample. */
export interface DecimateOptions {
  /** Number of filter taps, odd, ≥ 3. Default 64·factor + 1 (257 for a factor of 4). */
  taps?: number;
  /** Cut-off as a fraction of the output Nyquist frequency, in (0, 1]. Default 0.9. */
  cutoff?: number;
}

/**
 * A linear-phase low-pass FIR filter by the window method: the ideal impulse
 * response 2·f_c·sinc(2·f_c·m) tapered by a Blackman window (Blackman & Tukey,
 * 1958), normalised to unit gain at DC.
 *
 *   h[m] = w[m] · sin(2π f_c m) / (π m),   m = k − (N − 1)/2,  k = 0 … N − 1
 *   w[k] = 0.42 − 0.5 cos(2π k/(N − 1)) + 0.08 cos(4π k/(N − 1))
 *
 * f_c: cut-off in cycles per sample (0 < f_c < ½); N: taps (odd). The
 * Blackman window gives about 74 dB of stop-band attenuation and a transition
 * band about 5.5/N cycles per sample wide, centred on f_c.
 * @example
 * const h = lowPassKernel(0.1, 101);
 * h.reduce((s, x) => s + x, 0); // 1 (unit DC gain)
 */
export function lowPassKernel(cutoff: number, taps: number): Float64Array {
  const fc = numberInRange("lowPassKernel", "cutoff", cutoff, { min: 0, max: 0.5, minExclusive: true, maxExclusive: true });
  const n = integerInRange("lowPassKernel", "taps", taps, 3, 1 << 20);
  if (n % 2 === 0) throw new OptionError("lowPassKernel", "taps", taps, "an odd integer >= 3");
  const h = new Float64Array(n);
  const centre = (n - 1) / 2;
  let sum = 0;
  for (let k = 0; k < n; k++) {
    const m = k - centre;
    const ideal = m === 0 ? 2 * fc : Math.sin(2 * Math.PI * fc * m) / (Math.PI * m);
    const w = 0.42 - 0.5 * Math.cos((2 * Math.PI * k) / (n - 1)) + 0.08 * Math.cos((4 * Math.PI * k) / (n - 1));
    h[k] = ideal * w;
    sum += ideal * w;
  }
  for (let k = 0; k < n; k++) h[k] = (h[k] as number) / sum;
  return h;
}

/**
 * Lowers the sample rate of a recording by an integer factor: an anti-alias
 * low-pass ({@link lowPassKernel}, cut-off `cutoff` × the output Nyquist
 * frequency), then every `factor`-th sample. The filter is applied centred
 * (zero phase: output sample j is aligned with input sample j·factor), and
 * the signal is mirrored at both ends (x[−k] = x[k], x[n−1+k] = x[n−1−k]) so
 * that the ends carry no step. Only the kept samples are computed.
 *
 * Example: a 48 kHz recording decimated by 4 to 12 kHz with the defaults
 * (257 taps, cut-off 0.9 × 6 kHz = 5.4 kHz) passes 0–4.8 kHz within 0.002 dB,
 * is 6 dB down at 5.4 kHz, and attenuates everything at and above 6 kHz
 * (which would fold back below it) by at least 75 dB.
 * @param signal samples at the input rate.
 * @param factor integer ≥ 2.
 * @example
 * const out = decimate(new Float64Array(4800).fill(1), 4);
 * out.length; // 1200, every value 1 (a constant passes unchanged)
 */
export function decimate(signal: ArrayLike<number>, factor: number, options?: DecimateOptions): Float64Array {
  const opts = optionsObject<DecimateOptions>("decimate", options, ["taps", "cutoff"]);
  const m = integerInRange("decimate", "factor", factor, 2, 1 << 16);
  const taps = opts.taps === undefined ? 64 * m + 1 : integerInRange("decimate", "taps", opts.taps, 3, 1 << 20);
  if (taps % 2 === 0) throw new OptionError("decimate", "taps", opts.taps, "an odd integer >= 3");
  const cutoff = opts.cutoff === undefined ? 0.9 : numberInRange("decimate", "cutoff", opts.cutoff, { min: 0, max: 1, minExclusive: true });
  const x = finiteSamples("decimate", "signal", signal);
  const n = x.length;
  if (n === 0) return new Float64Array(0);
  // f_c in cycles per input sample: cutoff × (½ / factor)
  const h = lowPassKernel((cutoff * 0.5) / m, taps);
  const half = (taps - 1) / 2;
  const out = new Float64Array(Math.ceil(n / m));
  for (let j = 0; j < out.length; j++) {
    const centre = j * m;
    let acc = 0;
    if (centre - half >= 0 && centre + half < n) {
      for (let k = 0; k < taps; k++) acc += (h[k] as number) * (x[centre + half - k] as number);
    } else {
      for (let k = 0; k < taps; k++) acc += (h[k] as number) * (x[mirror(centre + half - k, n)] as number);
    }
    out[j] = acc;
  }
  return out;
}

// Even reflection about the end samples, repeated for signals shorter than the filter.
function mirror(i: number, n: number): number {
  if (n === 1) return 0;
  const period = 2 * (n - 1);
  let r = i % period;
  if (r < 0) r += period;
  return r < n ? r : period - r;
}
