import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { SpectrumAnalyzer, WINDOW_NAMES } from "@leeway/signal";
import { expectLeewayError } from "../support/errors.js";

const sine = (n: number, fs: number, f: number, a: number, phase = 0) => Float64Array.from({ length: n }, (_, t) => a * Math.sin((2 * Math.PI * f * t) / fs + phase));

describe("SpectrumAnalyzer", () => {
  it("a sine at an exact bin reads its amplitude there, for every window and any phase", () => {
    fc.assert(
      fc.property(fc.constantFrom(...WINDOW_NAMES), fc.integer({ min: 8, max: 500 }), fc.double({ min: 0.01, max: 100, noNaN: true }), fc.double({ min: 0, max: 6.28, noNaN: true }), (window, bin, a, phase) => {
        const sa = new SpectrumAnalyzer({ size: 1024, sampleRate: 5120, window });
        const amp = sa.amplitude(sine(1024, 5120, bin * sa.binWidth, a, phase));
        expect(Math.abs((amp[bin] as number) - a) / a).toBeLessThan(1e-9);
      }),
      { numRuns: 60 },
    );
  });

  it("a sine's power main lobe sums to A²/2 (mean square), and P_k = a_k²/(2·ENBW) at an exact bin", () => {
    for (const window of WINDOW_NAMES) {
      const sa = new SpectrumAnalyzer({ size: 1024, sampleRate: 5120, window });
      const x = sine(1024, 5120, 100 * sa.binWidth, 3);
      const p = sa.power(x);
      const a = sa.amplitude(x);
      let lobe = 0;
      for (let k = 90; k <= 110; k++) lobe += p[k] as number;
      expect(lobe).toBeCloseTo(4.5, 9);
      expect(p[100]).toBeCloseTo((a[100] as number) ** 2 / (2 * sa.window.enbw), 9);
    }
  });

  it("white noise: the power spectrum sums to the sample variance on average (ENBW correction), for every window", () => {
    const rng = new RandomSource(5);
    for (const window of WINDOW_NAMES) {
      const sa = new SpectrumAnalyzer({ size: 512, sampleRate: 1000, window });
      let ratio = 0;
      const frames = 200;
      for (let f = 0; f < frames; f++) {
        const p = sa.power(rng.fillNormal(new Float64Array(512), 0, 2));
        ratio += p.reduce((s, v) => s + v, 0) / 4;
      }
      // relative standard error of the mean ≈ 0.3 %
      expect(ratio / frames).toBeCloseTo(1, 1);
    }
  });

  it("DC and Nyquist bins are not doubled; density is power / Δf", () => {
    const sa = new SpectrumAnalyzer({ size: 16, sampleRate: 16, window: "rectangular" });
    const x = Float64Array.from({ length: 16 }, (_, t) => 2 + (t % 2 === 0 ? 1 : -1));
    const a = sa.amplitude(x);
    expect(a[0]).toBeCloseTo(2, 14);
    expect(a[8]).toBeCloseTo(1, 14);
    const p = sa.power(x);
    expect(p[0]).toBeCloseTo(4, 14);
    expect(p[8]).toBeCloseTo(1, 14);
    const d = new SpectrumAnalyzer({ size: 16, sampleRate: 32, window: "rectangular" }).density(x);
    expect(d[0]).toBeCloseTo(4 / 2, 14);
  });

  it("reuses the out buffer and allocates nothing else per frame (same array back)", () => {
    const sa = new SpectrumAnalyzer({ size: 64, sampleRate: 64 });
    const out = new Float64Array(33);
    expect(sa.amplitude(new Float64Array(64), out)).toBe(out);
    expect(sa.transform(new Float64Array(64))).toBe(sa.transform(new Float64Array(64)));
    expect(sa.frequency(4)).toBe(4);
    expect(sa.nyquist).toBe(32);
  });

  it("refuses bad options, wrong lengths and non-finite samples", () => {
    for (const size of [0, 2, 100, 1023, 3.5]) expectLeewayError(() => new SpectrumAnalyzer({ size, sampleRate: 1000 }), "E_OPTION", "size", "power of two");
    expectLeewayError(() => new SpectrumAnalyzer({ size: 64, sampleRate: 0 }), "E_OPTION", "sampleRate");
    expectLeewayError(() => new SpectrumAnalyzer({ size: 64, sampleRate: 10, window: "boxcar" as never }), "E_OPTION", "window");
    expectLeewayError(() => new SpectrumAnalyzer({ size: 64, sampleRate: 10, hop: 3 } as never), "E_OPTION", "hop");
    const sa = new SpectrumAnalyzer({ size: 64, sampleRate: 10 });
    expectLeewayError(() => sa.amplitude(new Float64Array(63)), "E_DIMENSION", "frame", "64");
    expectLeewayError(() => sa.power(new Float64Array(64), new Float64Array(32)), "E_DIMENSION", "out", "33");
    const bad = new Float64Array(64);
    bad[7] = Number.NaN;
    expectLeewayError(() => sa.power(bad), "E_NON_FINITE", "frame[7]");
  });
});
