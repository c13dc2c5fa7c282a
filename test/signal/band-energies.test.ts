import { describe, expect, it } from "vitest";
import { BandEnergies, SpectrumAnalyzer } from "@leeway/signal";
import { expectLeewayError } from "../support/errors.js";

describe("BandEnergies", () => {
  it("bins with centre in [lo, hi) go to the band; the last band keeps a bin on its upper edge", () => {
    const bands = new BandEnergies({ edges: [0, 10, 20, 32], size: 64, sampleRate: 64 });
    const power = Float64Array.from({ length: 33 }, () => 1);
    expect(Array.from(bands.compute(power))).toEqual([10, 10, 13]);
    expect(bands.bands).toBe(3);
  });

  it("energy of two sines lands in their bands and equals each one's mean square A²/2", () => {
    const sa = new SpectrumAnalyzer({ size: 1024, sampleRate: 5120 });
    const x = Float64Array.from({ length: 1024 }, (_, t) => 2 * Math.sin((2 * Math.PI * 100 * t) / 5120) + 0.5 * Math.sin((2 * Math.PI * 1000 * t) / 5120));
    const e = new BandEnergies({ edges: [50, 150, 800, 1200], size: 1024, sampleRate: 5120 }).compute(sa.power(x));
    expect(e[0]).toBeCloseTo(2, 9);
    expect(e[1]).toBeCloseTo(0, 9);
    expect(e[2]).toBeCloseTo(0.125, 9);
  });

  it("refuses edges out of order, negative, past Nyquist, fewer than two, and wrong power lengths", () => {
    const base = { size: 64, sampleRate: 64 };
    expectLeewayError(() => new BandEnergies({ ...base, edges: [0, 20, 10] }), "E_OPTION", "edges[2]", "strictly increasing");
    expectLeewayError(() => new BandEnergies({ ...base, edges: [5, 5] }), "E_OPTION", "edges[1]", "strictly increasing");
    expectLeewayError(() => new BandEnergies({ ...base, edges: [0, 40] }), "E_OPTION", "edges[1]", "Nyquist");
    expectLeewayError(() => new BandEnergies({ ...base, edges: [-1, 10] }), "E_OPTION", "edges[0]");
    expectLeewayError(() => new BandEnergies({ ...base, edges: [10] }), "E_OPTION", "edges", "at least 2");
    expectLeewayError(() => new BandEnergies({ ...base, edges: [0, Number.NaN] }), "E_OPTION", "edges[1]");
    expectLeewayError(() => new BandEnergies({ ...base, size: 63, edges: [0, 10] }), "E_OPTION", "size");
    expectLeewayError(() => new BandEnergies({ ...base, edges: [0, 10] }).compute(new Float64Array(32)), "E_DIMENSION", "power", "33");
  });
});
