import { describe, expect, it } from "vitest";
import { SpectrumAnalyzer, velocityRms, velocitySpectrum } from "@leeway/signal";
import { expectLeewayError } from "../support/errors.js";

describe("velocity from acceleration", () => {
  it("v_k = a_k/(2πf_k) in mm/s, zero below the low cut and at DC", () => {
    const a = Float64Array.from([5, 1, 1, 1, 1]);
    const v = velocitySpectrum(a, 10, 15);
    expect(v[0]).toBe(0);
    expect(v[1]).toBe(0);
    expect(v[2]).toBeCloseTo(1000 / (2 * Math.PI * 20), 12);
    expect(v[4]).toBeCloseTo(1000 / (2 * Math.PI * 40), 12);
  });

  it("velocity RMS from a power spectrum equals √Σ(v_k²/2) of the amplitude spectrum for lines on exact bins", () => {
    const sa = new SpectrumAnalyzer({ size: 1024, sampleRate: 5120, window: "rectangular" });
    const x = Float64Array.from({ length: 1024 }, (_, t) => 3 * Math.sin((2 * Math.PI * 50 * t) / 5120) + 7 * Math.cos((2 * Math.PI * 400 * t) / 5120));
    const v = velocitySpectrum(sa.amplitude(x), sa.binWidth, 10);
    let sum = 0;
    for (const vk of v) sum += (vk * vk) / 2;
    expect(velocityRms(sa.power(x), sa.binWidth, 10)).toBeCloseTo(Math.sqrt(sum), 9);
    // the low cut removes the 50 Hz line
    expect(velocityRms(sa.power(x), sa.binWidth, 100)).toBeCloseTo(((7 / (2 * Math.PI * 400)) * 1000) / Math.SQRT2, 9);
  });

  it("refuses a non-positive bin width, a negative low cut and a wrong out length", () => {
    expectLeewayError(() => velocitySpectrum(new Float64Array(4), 0, 1), "E_OPTION", "binWidth");
    expectLeewayError(() => velocitySpectrum(new Float64Array(4), 1, -1), "E_OPTION", "lowCut");
    expectLeewayError(() => velocitySpectrum(new Float64Array(4), 1, 1, new Float64Array(3)), "E_DIMENSION", "out");
    expectLeewayError(() => velocityRms(new Float64Array(4), -2, 1), "E_OPTION", "binWidth");
    expectLeewayError(() => velocityRms(new Float64Array(1), 1, 1), "E_OPTION", "power");
  });
});
