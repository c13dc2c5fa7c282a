import { finiteNumber, integerInRange, numberInRange, optionsObject, positiveNumber } from "@leeway/core";
import { normalCdf } from "@leeway/stats";

/** Options of {@link ewmaArl}. */
export interface EwmaArlOptions {
  /** Number of Markov-chain states (odd, default 401). */
  states?: number;
}

/**
 * Zero-state average run length of a two-sided EWMA chart with the asymptotic limits ±L·√(λ/(2 − λ)),
 * for a mean shift δ (in σ) of normal samples, by the Markov-chain method of Brook & Evans (1972) as used
 * by Lucas & Saccucci (1990). The in-control region (−c, c), c = L·√(λ/(2 − λ)), is cut into m states of
 * width w = 2c/m with midpoints sᵢ; the chain moves from sᵢ to sⱼ with probability
 *
 *   Pᵢⱼ = Φ((sⱼ + w/2 − (1 − λ)sᵢ)/λ − δ) − Φ((sⱼ − w/2 − (1 − λ)sᵢ)/λ − δ),
 *
 * and the ARLs from every state solve (I − P)·ARL = 1; the result is the entry of the middle state (z₀ = 0).
 * With λ = 1 it is the Shewhart chart: 1/(Φ(−L − δ) + 1 − Φ(L − δ)) exactly.
 * @example
 * ewmaArl(1, 3, 0); // 370.398… (the 3σ Shewhart chart)
 */
export function ewmaArl(lambda: number, L: number, shift: number, options: EwmaArlOptions = {}): number {
  const o = optionsObject<EwmaArlOptions>("ewmaArl", options, ["states"]);
  numberInRange("ewmaArl", "lambda", lambda, { min: 0, max: 1, minExclusive: true });
  positiveNumber("ewmaArl", "L", L);
  finiteNumber("ewmaArl", "shift", shift);
  const m = o.states === undefined ? 401 : integerInRange("ewmaArl", "states", o.states, 3, 2001);
  const c = L * Math.sqrt(lambda / (2 - lambda));
  const w = (2 * c) / m;
  // A = I − P, row-major, with the right-hand side of ones in column m
  const cols = m + 1;
  const a = new Float64Array(m * cols);
  const cdf = new Float64Array(m + 1);
  for (let i = 0; i < m; i++) {
    const si = -c + (i + 0.5) * w;
    const centre = (1 - lambda) * si;
    for (let j = 0; j <= m; j++) cdf[j] = normalCdf((-c + j * w - centre) / lambda - shift);
    const row = i * cols;
    for (let j = 0; j < m; j++) a[row + j] = -((cdf[j + 1] as number) - (cdf[j] as number));
    a[row + i] = (a[row + i] as number) + 1;
    a[row + m] = 1;
  }
  const arl = solveInPlace(a, m);
  return arl[(m - 1) >> 1] as number;
}

/** Gaussian elimination with partial pivoting on an m × (m + 1) augmented matrix; returns the solution. */
function solveInPlace(a: Float64Array, m: number): Float64Array {
  const cols = m + 1;
  for (let p = 0; p < m; p++) {
    let best = p;
    for (let r = p + 1; r < m; r++) if (Math.abs(a[r * cols + p] as number) > Math.abs(a[best * cols + p] as number)) best = r;
    if (best !== p) {
      for (let j = p; j < cols; j++) {
        const t = a[p * cols + j] as number;
        a[p * cols + j] = a[best * cols + j] as number;
        a[best * cols + j] = t;
      }
    }
    const pivot = a[p * cols + p] as number;
    for (let r = p + 1; r < m; r++) {
      const f = (a[r * cols + p] as number) / pivot;
      if (f === 0) continue;
      for (let j = p; j < cols; j++) a[r * cols + j] = (a[r * cols + j] as number) - f * (a[p * cols + j] as number);
    }
  }
  const x = new Float64Array(m);
  for (let r = m - 1; r >= 0; r--) {
    let s = a[r * cols + m] as number;
    for (let j = r + 1; j < m; j++) s -= (a[r * cols + j] as number) * (x[j] as number);
    x[r] = s / (a[r * cols + r] as number);
  }
  return x;
}
