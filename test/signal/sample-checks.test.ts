import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { BandEnergies, SpectrumAnalyzer, reduceBins, timeFeatures, toDecibels, velocityRms, velocitySpectrum } from "@leeway/signal";
import { expectLeewayError } from "../support/errors.js";

const frame = (n: number, f: (t: number) => number): Float64Array => Float64Array.from({ length: n }, (_, t) => f(t));

describe("signal functions refuse non-numbers and never return NaN or ±Infinity", () => {
  it("a plain array with a non-number element, or a non-array, is refused with E_SAMPLE naming the element", () => {
    const sa = new SpectrumAnalyzer({ size: 8, sampleRate: 80 });
    const bands = new BandEnergies({ edges: [0, 20, 40], size: 8, sampleRate: 80 });
    const withString = [1, 2, "3", 4, 5, 6, 7, 8] as never;
    expectLeewayError(() => sa.power(withString), "E_SAMPLE", "SpectrumAnalyzer: frame[2] must be a number", '"3" (string)');
    expectLeewayError(() => sa.amplitude("12345678" as never), "E_SAMPLE", "SpectrumAnalyzer: frame must be");
    expectLeewayError(() => timeFeatures([1, null] as never), "E_SAMPLE", "timeFeatures: frame[1]", "null");
    expectLeewayError(() => bands.compute([1, 2, 3, 4, [5]] as never), "E_SAMPLE", "power[4]");
    expectLeewayError(() => reduceBins([1, true] as never, 1), "E_SAMPLE", "values[1]");
    expectLeewayError(() => toDecibels(["1"] as never), "E_SAMPLE", "values[0]");
    expectLeewayError(() => velocitySpectrum([0, "1"] as never, 5, 0), "E_SAMPLE", "acceleration[1]");
    expectLeewayError(() => velocityRms([0, {}] as never, 5, 0), "E_SAMPLE", "power[1]");
  });

  it("NaN and ±Infinity are refused with E_NON_FINITE naming the element, not mapped to a floor or carried into the result", () => {
    expectLeewayError(() => toDecibels(Float64Array.from([1, Number.NaN])), "E_NON_FINITE", "values[1]");
    expectLeewayError(() => velocityRms(Float64Array.from([0, 1, Infinity]), 5, 0), "E_NON_FINITE", "power[2]");
    expectLeewayError(() => reduceBins(Float64Array.from([1, -Infinity]), 1), "E_NON_FINITE", "values[1]");
    expectLeewayError(() => new SpectrumAnalyzer({ size: 8, sampleRate: 80 }).power(frame(8, (t) => (t === 5 ? Number.NaN : t))), "E_NON_FINITE", "frame[5]");
  });

  it("samples up to 1e140 give finite spectra; a finite frame whose spectrum would overflow is refused with E_SAMPLE stating the range", () => {
    const sa = new SpectrumAnalyzer({ size: 1024, sampleRate: 5000, window: "rectangular" });
    const big = frame(1024, () => 1e140);
    for (const p of sa.power(big)) expect(Number.isFinite(p)).toBe(true);
    for (const d of sa.density(big)) expect(Number.isFinite(d)).toBe(true);
    expectLeewayError(() => sa.power(frame(1024, (t) => (t % 2 === 0 ? 1e300 : -1e300))), "E_SAMPLE", "SpectrumAnalyzer: frame must be values whose squared magnitude spectrum stays finite", "1e+140", "got 1e+300");
    expectLeewayError(() => new BandEnergies({ edges: [0, 2500], size: 4, sampleRate: 5000 }).compute(Float64Array.from([1e308, 1e308, 1e308])), "E_SAMPLE", "band sums");
    expectLeewayError(() => toDecibels(Float64Array.from([1e308]), { reference: 1e-10 }), "E_SAMPLE", "ratio to the reference");
  });

  it("property: time features of any finite frame are finite, and scaling the frame by 2^k scales mean, rms and peak by 2^k and leaves the shape factors", () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ noNaN: true, noDefaultInfinity: true }), { minLength: 1, maxLength: 64 }),
        fc.integer({ min: -40, max: 40 }),
        (xs, k) => {
          const f = timeFeatures(Float64Array.from(xs));
          for (const v of Object.values(f)) expect(Number.isFinite(v)).toBe(true);
          const bounded = xs.map((x) => (Math.abs(x) < 1e-200 ? 0 : x / 2 ** 100)); // below 2^924 and never subnormal: room to scale both ways exactly
          const a = timeFeatures(Float64Array.from(bounded));
          const b = timeFeatures(Float64Array.from(bounded, (x) => x * 2 ** k));
          expect(b.peak).toBe(a.peak * 2 ** k);
          expect(b.crestFactor).toBeCloseTo(a.crestFactor, 9);
        },
      ),
      { numRuns: 200 },
    );
  });

  it("time features of samples near the top of the double range: a ±1e300 square wave has rms = peak = 1e300, crest factor 1 and kurtosis 1 (to 1e-12), and a lone -Number.MAX_VALUE is its own peak and rms", () => {
    const f = timeFeatures(frame(1000, (t) => (t % 2 === 0 ? 1e300 : -1e300)));
    expect(f.peak).toBe(1e300);
    expect(Math.abs(f.rms / 1e300 - 1)).toBeLessThan(1e-12);
    expect(Math.abs(f.crestFactor - 1)).toBeLessThan(1e-12);
    expect(Math.abs(f.kurtosis - 1)).toBeLessThan(1e-12);
    const lone = timeFeatures(Float64Array.from([-Number.MAX_VALUE]));
    expect([lone.mean, lone.rms, lone.peak]).toEqual([-Number.MAX_VALUE, Number.MAX_VALUE, Number.MAX_VALUE]);
  });
});
