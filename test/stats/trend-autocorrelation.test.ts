import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { mannKendall, mannKendallHamedRao, mannKendallPrewhitened } from "@leeway/stats";
import { expectLeewayError } from "../support/errors.js";

// Monte Carlo seed, fixed per commit and printed.
const SEED = 20261205;
const N = 240; // points: the engine's long trend window holds 240 block means
const PHIS = [0.5, 0.9, 0.98];

/**
 * Replicates for "rate ≤ 2α": enough that a test whose true rate is 1.5α
 * shows more than 2α with probability ≤ 0.1 % (one-sided z 3.09, normal
 * approximation of the binomial): 3.09·√(α(1−α)/R) ≤ α/2 ⇒ R ≥ 38.2·(1−α)/α.
 */
const replicatesFor = (alpha: number): number => Math.ceil((38.2 * (1 - alpha)) / alpha);

/** Stationary AR(1) noise x_t = φ·x_{t−1} + ε_t, ε ~ N(0, 1), started from the stationary law. */
function ar1(rng: RandomSource, phi: number, n: number, out = new Float64Array(n)): Float64Array {
  let x = rng.normal() / Math.sqrt(1 - phi * phi);
  for (let t = 0; t < n; t++) {
    x = phi * x + rng.normal();
    out[t] = x;
  }
  return out;
}

function rejectionRate(phi: number, replicates: number, rejects: (x: Float64Array) => boolean): number {
  const rng = new RandomSource(SEED).derive(`phi ${phi}`);
  const x = new Float64Array(N);
  let count = 0;
  for (let r = 0; r < replicates; r++) if (rejects(ar1(rng, phi, N, x))) count++;
  return count / replicates;
}

describe("mannKendallHamedRao", () => {
  it("without significant autocorrelation it is the plain test: same S, variance and z (Hamed & Rao, 1998, eq. for n/n*; from memory)", () => {
    const xs = [3, 1, 4, 1, 5, 9, 2, 6, 5, 3, 5, 8];
    const r = mannKendallHamedRao(xs);
    const plain = mannKendall(xs);
    expect(r.lagsUsed).toEqual([]);
    expect([r.s, r.variance, r.correctedVariance, r.z]).toEqual([plain.s, plain.variance, plain.variance, plain.z]);
  });

  it("n/n* = 1 + 2/(n(n−1)(n−2))·Σ(n−k)(n−k−1)(n−k−2)ρ_k over all lags equals a direct evaluation on the detrended ranks (from memory)", () => {
    const xs = Array.from(ar1(new RandomSource(SEED).derive("direct"), 0.8, 30));
    const r = mannKendallHamedRao(xs, { lags: "all" });
    const n = xs.length;
    const detrended = xs.map((x, t) => x - r.slope * (t + 1));
    const sorted = [...detrended].sort((a, b) => a - b);
    const ranks = detrended.map((v) => sorted.indexOf(v) + 1); // no ties in continuous data
    const mean = (n + 1) / 2;
    const c0 = ranks.reduce((s, v) => s + (v - mean) ** 2, 0);
    let sum = 0;
    for (let k = 1; k < n; k++) {
      let c = 0;
      for (let t = 0; t + k < n; t++) c += (ranks[t]! - mean) * (ranks[t + k]! - mean);
      sum += (n - k) * (n - k - 1) * (n - k - 2) * (c / c0);
    }
    expect(r.lagsUsed).toHaveLength(n - 1);
    expect(r.varianceFactor).toBeCloseTo(Math.max(1e-3, 1 + (2 / (n * (n - 1) * (n - 2))) * sum), 12);
    expect(r.correctedVariance).toBeCloseTo(r.variance * r.varianceFactor, 9);
  });

  it("rejects less often than the plain test on AR(1) noise at every φ, and holds 2× its level at φ = 0.5 with leading lags (printed: the rates at every φ)", () => {
    const alpha = 0.05;
    const replicates = replicatesFor(alpha);
    for (const phi of PHIS) {
      const plain = rejectionRate(phi, replicates, (x) => mannKendall(x).pValue < alpha);
      const corrected = rejectionRate(phi, replicates, (x) => mannKendallHamedRao(x).pValue < alpha);
      const leading = rejectionRate(phi, replicates, (x) => mannKendallHamedRao(x, { lags: "leading" }).pValue < alpha);
      console.log(`Hamed-Rao, AR(1) φ=${phi}, n=${N}, two-sided α=${alpha}, ${replicates} replicates, seed ${SEED}: plain ${plain.toFixed(3)}, corrected (significant lags) ${corrected.toFixed(3)}, corrected (leading lags) ${leading.toFixed(3)}`);
      expect(corrected).toBeLessThan(plain);
      expect(leading).toBeLessThan(plain);
      if (phi === 0.5) expect(leading).toBeLessThanOrEqual(2 * alpha);
    }
  });

  it("refuses series shorter than 4 points, non-finite values and bad options", () => {
    expectLeewayError(() => mannKendallHamedRao([1, 2, 3]), "E_OPTION", "values", "at least 4");
    expectLeewayError(() => mannKendallHamedRao([1, 2, Number.NaN, 4]), "E_NON_FINITE", "values[2]");
    expectLeewayError(() => mannKendallHamedRao([1, 2, 3, 4, 5], { maxLag: 5 }), "E_OPTION", "maxLag", "5");
    expectLeewayError(() => mannKendallHamedRao([1, 2, 3, 4, 5], { significance: 0 }), "E_OPTION", "significance");
    expectLeewayError(() => mannKendallHamedRao([1, 2, 3, 4, 5], { lags: "some" as never }), "E_OPTION", "lags", "some");
  });
});

describe("mannKendallPrewhitened", () => {
  it("keeps its false-positive rate within 2× the nominal level on AR(1) noise with φ = 0.5, 0.9, 0.98, two-sided 5 % and one-sided 1 % (Monte Carlo; printed)", () => {
    for (const [alpha, sided] of [[0.05, "two-sided"], [0.01, "rising"]] as const) {
      const replicates = replicatesFor(alpha);
      for (const phi of PHIS) {
        const rate = rejectionRate(phi, replicates, (x) => {
          const r = mannKendallPrewhitened(x);
          return (sided === "two-sided" ? r.pValue : r.pRising) < alpha;
        });
        console.log(`pre-whitened Mann-Kendall, AR(1) φ=${phi}, n=${N}, ${sided} α=${alpha}, ${replicates} replicates, seed ${SEED}: false-positive rate ${rate.toFixed(4)}`);
        expect(rate).toBeLessThanOrEqual(2 * alpha);
      }
    }
  });

  it("still finds a trend that is large against the noise: a rise of 4 σ over 240 points of AR(1) noise with φ = 0.5, in at least 95 % of 200 series at one-sided 0.1 %", () => {
    const rng = new RandomSource(SEED).derive("power");
    let found = 0;
    for (let r = 0; r < 200; r++) {
      const x = ar1(rng, 0.5, N);
      const sd = 1 / Math.sqrt(1 - 0.25);
      for (let t = 0; t < N; t++) x[t] = x[t]! + (4 * sd * t) / N;
      if (mannKendallPrewhitened(x).pRising < 0.001) found++;
    }
    expect(found).toBeGreaterThanOrEqual(190);
  });

  it("removes the bias-corrected lag-1 autocorrelation φ̂ = (n·r1 + 1)/(n − 3) of the series (Marriott & Pope, 1954; from memory)", () => {
    const x = ar1(new RandomSource(SEED).derive("phi"), 0.7, 400);
    const r = mannKendallPrewhitened(x);
    expect(r.phi).toBeCloseTo((400 * r.r1 + 1) / 397, 12);
    expect(r.phi).toBeGreaterThan(0.6);
    expect(r.phi).toBeLessThan(0.8);
    const y = Array.from({ length: 399 }, (_, t) => x[t + 1]! - r.phi * x[t]!);
    expect(r.s).toBe(mannKendall(y).s);
  });

  it("refuses series shorter than 5 points and non-finite values", () => {
    expectLeewayError(() => mannKendallPrewhitened([1, 2, 3, 4]), "E_OPTION", "values", "at least 5");
    expectLeewayError(() => mannKendallPrewhitened([1, 2, 3, Infinity, 5]), "E_NON_FINITE", "values[3]");
  });
});
