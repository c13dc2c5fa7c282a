import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { SpectrumAnalyzer, timeFeatures, velocityRms, velocitySpectrum } from "@leeway/signal";

const sine = (n: number, cycles: number, a: number) => Float64Array.from({ length: n }, (_, t) => a * Math.sin((2 * Math.PI * cycles * t) / n));

describe("vibration math facts", () => {
  it("crest factor of a sine is √2 and its kurtosis 1.5, skewness 0 (common practice, no source: E[sin⁴]/E[sin²]² = (3/8)/(1/4))", () => {
    const f = timeFeatures(sine(4096, 16, 3));
    expect(f.crestFactor).toBeCloseTo(Math.SQRT2, 9);
    expect(f.kurtosis).toBeCloseTo(1.5, 9);
    expect(f.skewness).toBeCloseTo(0, 9);
    expect(f.rms).toBeCloseTo(3 / Math.SQRT2, 9);
  });

  it("kurtosis of Gaussian noise ≈ 3 (normal distribution, common practice, no source); 2^16 samples, standard error ≈ 0.02", () => {
    const x = new RandomSource(21).fillNormal(new Float64Array(65536));
    const f = timeFeatures(x);
    expect(Math.abs(f.kurtosis - 3)).toBeLessThan(0.1);
    expect(Math.abs(f.skewness)).toBeLessThan(0.05);
  });

  it("10 m/s² at 100 Hz is 15.9 mm/s peak and 11.25 mm/s RMS velocity (worked physics example: v = a/(2πf); common practice, no source)", () => {
    const sa = new SpectrumAnalyzer({ size: 1024, sampleRate: 5120, window: "rectangular" });
    const x = Float64Array.from({ length: 1024 }, (_, t) => 10 * Math.sin((2 * Math.PI * 100 * t) / 5120));
    const v = velocitySpectrum(sa.amplitude(x), sa.binWidth, 10);
    expect(v[20]).toBeCloseTo(15.9, 1);
    expect(velocityRms(sa.power(x), sa.binWidth, 10)).toBeCloseTo(11.25, 2);
    // through a Hann window the 100 Hz line spreads over bins 19–21: within 0.5 %
    const hann = new SpectrumAnalyzer({ size: 1024, sampleRate: 5120, window: "hann" });
    expect(Math.abs(velocityRms(hann.power(x), hann.binWidth, 10) / 11.254 - 1)).toBeLessThan(0.005);
    expect(velocitySpectrum(hann.amplitude(x), hann.binWidth, 10)[20]).toBeCloseTo(15.9, 1);
  });
});
