import { oneOf, positiveInteger } from "@leeway/core";

/** The analysis windows offered. */
export type WindowName = "rectangular" | "hann" | "hamming" | "blackman-harris" | "flat-top";

/** Every window name, in a stable order. */
export const WINDOW_NAMES: readonly WindowName[] = ["rectangular", "hann", "hamming", "blackman-harris", "flat-top"];

/**
 * Cosine-sum coefficients a_0..a_K of w[n] = Σ_k (−1)^k·a_k·cos(2πkn/N).
 * Hann, Hamming and the 4-term (−92 dB) Blackman-Harris are as in Harris
 * (1978, Table 1 and eq. 33); the flat-top is the five-term window
 * 1 − 1.93cos + 1.29cos2 − 0.388cos3 + 0.028cos4, normalised to a_0 + ... = 1
 * (listed as "FTSRS" by Heinzel, Rüdiger & Schilling, 2002).
 */
const COSINE_SUMS: Readonly<Record<WindowName, readonly number[]>> = {
  rectangular: [1],
  hann: [0.5, 0.5],
  hamming: [0.54, 0.46],
  "blackman-harris": [0.35875, 0.48829, 0.14128, 0.01168],
  "flat-top": [1 / 4.636, 1.93 / 4.636, 1.29 / 4.636, 0.388 / 4.636, 0.028 / 4.636],
};

/** A sampled window and the constants that correct spectra taken through it. */
export interface Window {
  name: WindowName;
  /** w[0..N−1]. */
  values: Float64Array;
  /** Coherent gain CG = (1/N)·Σ w[n]: the window's gain on a sine at an exact bin. */
  coherentGain: number;
  /** Equivalent noise bandwidth in bins, ENBW = N·Σw² / (Σw)². */
  enbw: number;
  /** Mean square of the window, (1/N)·Σ w² (the noise power gain). */
  powerGain: number;
}

/**
 * Samples an analysis window of N points in its periodic ("DFT-even") form,
 * the form Harris (1978) recommends for harmonic analysis with the DFT, and
 * computes its coherent gain and equivalent noise bandwidth from the samples.
 * Method: cosine-sum windows, Harris (1978), "On the use of windows for
 * harmonic analysis with the discrete Fourier transform".
 * @param name one of {@link WINDOW_NAMES}
 * @param size N, the frame length in samples
 * @example
 * const w = makeWindow("hann", 1024);
 * w.coherentGain; // 0.5
 * w.enbw; // 1.5 (bins)
 */
export function makeWindow(name: WindowName, size: number): Window {
  const checkedName = oneOf("makeWindow", "name", name, WINDOW_NAMES);
  const n = positiveInteger("makeWindow", "size", size, 2 ** 24);
  const a = COSINE_SUMS[checkedName];
  const values = new Float64Array(n);
  let sum = 0;
  let sumSquares = 0;
  for (let i = 0; i < n; i++) {
    let w = 0;
    for (let k = 0; k < a.length; k++) w += (k % 2 === 0 ? 1 : -1) * (a[k] as number) * Math.cos((2 * Math.PI * k * i) / n);
    values[i] = w;
    sum += w;
    sumSquares += w * w;
  }
  return {
    name: checkedName,
    values,
    coherentGain: sum / n,
    enbw: (n * sumSquares) / (sum * sum),
    powerGain: sumSquares / n,
  };
}
