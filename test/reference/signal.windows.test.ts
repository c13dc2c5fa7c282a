import { describe, expect, it } from "vitest";
import { SpectrumAnalyzer, makeWindow, type WindowName } from "@leeway/signal";

// Harris, F. J. (1978), "On the use of windows for harmonic analysis with the
// discrete Fourier transform", Proc. IEEE 66(1), Table 1: coherent gain and
// equivalent noise bandwidth (bins), printed to two decimals.
const HARRIS_1978_TABLE_1: [WindowName, number, number][] = [
  ["rectangular", 1.0, 1.0],
  ["hann", 0.5, 1.5],
  ["hamming", 0.54, 1.36],
  ["blackman-harris", 0.36, 2.0], // 4-term, −92 dB
];

describe("window constants against published values", () => {
  for (const [name, cg, enbw] of HARRIS_1978_TABLE_1) {
    it(`${name}: coherent gain ${cg}, ENBW ${enbw} bins (Harris 1978, Table 1)`, () => {
      const w = makeWindow(name, 1024);
      expect(Math.abs(w.coherentGain - cg)).toBeLessThanOrEqual(0.005);
      expect(Math.abs(w.enbw - enbw)).toBeLessThanOrEqual(0.005);
    });
  }

  it("Hann exactly: coherent gain 0.5 and ENBW 1.5 bins (Harris 1978, Table 1)", () => {
    const w = makeWindow("hann", 4096);
    expect(w.coherentGain).toBeCloseTo(0.5, 12);
    expect(w.enbw).toBeCloseTo(1.5, 12);
  });

  it("flat-top (FTSRS): ENBW 3.7702 bins, coherent gain 1/4.636 = 0.2157 (Heinzel, Rüdiger & Schilling 2002, 'Spectrum and spectral density estimation by the DFT', window table; from memory)", () => {
    const w = makeWindow("flat-top", 1024);
    expect(w.enbw).toBeCloseTo(3.7702, 3);
    expect(w.coherentGain).toBeCloseTo(0.2157, 4);
  });

  it("flat-top scalloping loss is below 0.02 dB: a sine half a bin off reads its amplitude within 0.25 % (Heinzel et al. 2002 list ≈ 0.0 dB for FTSRS; from memory)", () => {
    const sa = new SpectrumAnalyzer({ size: 1024, sampleRate: 1024, window: "flat-top" });
    const x = Float64Array.from({ length: 1024 }, (_, t) => Math.sin((2 * Math.PI * 100.5 * t) / 1024));
    const a = sa.amplitude(x);
    expect(Math.max(a[100] as number, a[101] as number)).toBeGreaterThan(0.9975);
    expect(Math.max(a[100] as number, a[101] as number)).toBeLessThan(1.0025);
  });

  it("Hann scalloping loss 1.42 dB at half a bin (Harris 1978, Table 1)", () => {
    const sa = new SpectrumAnalyzer({ size: 1024, sampleRate: 1024, window: "hann" });
    const x = Float64Array.from({ length: 1024 }, (_, t) => Math.sin((2 * Math.PI * 100.5 * t) / 1024));
    const lossDb = -20 * Math.log10(sa.amplitude(x)[100] as number);
    expect(lossDb).toBeCloseTo(1.42, 2);
  });
});
