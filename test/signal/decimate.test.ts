import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { decimate, lowPassKernel } from "@leeway/signal";
import { expectLeewayError } from "../support/errors.js";

// |H(f)| of a centred FIR kernel, f in cycles per sample.
function gain(h: Float64Array, f: number): number {
  const centre = (h.length - 1) / 2;
  let re = 0;
  let im = 0;
  h.forEach((v, k) => {
    re += v * Math.cos(2 * Math.PI * f * (k - centre));
    im += v * Math.sin(2 * Math.PI * f * (k - centre));
  });
  return Math.hypot(re, im);
}

const dB = (g: number): number => 20 * Math.log10(g);
const rms = (xs: ArrayLike<number>, from: number, to: number): number => {
  let s = 0;
  for (let i = from; i < to; i++) s += (xs[i] as number) ** 2;
  return Math.sqrt(s / (to - from));
};

describe("lowPassKernel", () => {
  it("is symmetric with unit DC gain", () => {
    const h = lowPassKernel(0.1, 101);
    expect(h.length).toBe(101);
    for (let k = 0; k < 50; k++) expect(h[k]).toBeCloseTo(h[100 - k] as number, 15);
    expect(h.reduce((s, x) => s + x, 0)).toBeCloseTo(1, 14);
  });

  it("for 48 kHz → 12 kHz (257 taps, cut-off 5.4 kHz): flat to 4.8 kHz, −6 dB at the cut-off, ≥ 75 dB down from 6 kHz (windowed-sinc with a Blackman window; Blackman & Tukey 1958, common practice)", () => {
    const h = lowPassKernel((0.9 * 0.5) / 4, 257);
    for (let hz = 0; hz <= 4800; hz += 50) expect(Math.abs(dB(gain(h, hz / 48000)))).toBeLessThan(0.002);
    expect(dB(gain(h, 5400 / 48000))).toBeCloseTo(-6.02, 1); // the window method puts half the amplitude at f_c
    for (let hz = 6000; hz <= 24000; hz += 25) expect(dB(gain(h, hz / 48000))).toBeLessThan(-75);
  });

  it("refuses cut-offs outside (0, ½) and even or tiny tap counts", () => {
    expectLeewayError(() => lowPassKernel(0.5, 11), "E_OPTION", "cutoff", "0.5");
    expectLeewayError(() => lowPassKernel(0.1, 10), "E_OPTION", "taps", "10", "odd");
    expectLeewayError(() => lowPassKernel(0.1, 1), "E_OPTION", "taps", "1");
  });
});

describe("decimate", () => {
  it("equals a direct convolution with the mirrored signal, sampled every factor-th sample", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -10, max: 10, noNaN: true }), { minLength: 1, maxLength: 120 }), fc.integer({ min: 2, max: 5 }), (xs, factor) => {
        const taps = 4 * factor + 1;
        const h = lowPassKernel((0.9 * 0.5) / factor, taps);
        const half = (taps - 1) / 2;
        const n = xs.length;
        const at = (i: number): number => {
          // even reflection about the ends, repeated
          if (n === 1) return xs[0] as number;
          const period = 2 * (n - 1);
          const r = ((i % period) + period) % period;
          return xs[r < n ? r : period - r] as number;
        };
        const out = decimate(xs, factor, { taps });
        expect(out.length).toBe(Math.ceil(n / factor));
        out.forEach((y, j) => {
          let direct = 0;
          for (let m = -half; m <= half; m++) direct += (h[m + half] as number) * at(j * factor - m);
          expect(y).toBeCloseTo(direct, 10);
        });
      }),
      { numRuns: 150 },
    );
  });

  it("passes a constant unchanged, ends included", () => {
    const out = decimate(new Float64Array(4800).fill(1.5), 4);
    expect(out.length).toBe(1200);
    for (const y of out) expect(y).toBeCloseTo(1.5, 12);
  });

  it("keeps a 1 kHz tone and removes a 9 kHz tone that would alias to 3 kHz (48 kHz → 12 kHz)", () => {
    const n = 48_000;
    const tone = (hz: number): Float64Array => Float64Array.from({ length: n }, (_, i) => Math.sin((2 * Math.PI * hz * i) / 48_000));
    const kept = decimate(tone(1000), 4);
    // interior samples equal the tone sampled at 12 kHz (no delay: the filter is centred)
    for (let j = 100; j < kept.length - 100; j += 37) expect(kept[j]).toBeCloseTo(Math.sin((2 * Math.PI * 1000 * j) / 12_000), 4);
    const removed = decimate(tone(9000), 4);
    expect(dB(rms(removed, 100, removed.length - 100) / Math.SQRT1_2)).toBeLessThan(-75);
  });

  it("refuses bad factors, options and non-finite samples", () => {
    expectLeewayError(() => decimate([1, 2, 3], 1), "E_OPTION", "factor", "1");
    expectLeewayError(() => decimate([1, 2, 3], 2.5), "E_OPTION", "factor", "2.5");
    expectLeewayError(() => decimate([1, 2, 3], 2, { taps: 8 }), "E_OPTION", "taps", "8");
    expectLeewayError(() => decimate([1, 2, 3], 2, { cutoff: 1.2 }), "E_OPTION", "cutoff", "1.2");
    expectLeewayError(() => decimate([1, 2, 3], 2, { order: 3 } as never), "E_OPTION", "order");
    expectLeewayError(() => decimate([1, Number.NaN, 3], 2), "E_NON_FINITE", "signal[1]", "NaN");
    expect(decimate([], 3)).toEqual(new Float64Array(0));
  });
});
