import { describe, expect, it } from "vitest";
import { jumperLogBet, mixtureLogBet, powerLogBet } from "../../packages/change/src/conformal-betting.js";

/** ∫₀¹ f(p) dp by the midpoint rule on a grid refined towards 0 (p = u², dp = 2u du). */
function integral(f: (p: number) => number): number {
  const n = 400_000;
  let sum = 0;
  for (let k = 0; k < n; k++) {
    const u = (k + 0.5) / n;
    sum += f(u * u) * 2 * u;
  }
  return sum / n;
}

/**
 * ∫₀¹ f(p) dp of the mixture in t = −ln p: ∫₀^∞ f(e^{−t}) e^{−t} dt, by Simpson's rule in s = ln t over
 * t ∈ [1e−8, 700] (p = e^{−700} is still a double), plus the tail beyond 700, where the integrand
 * (1 − (t + 1)e^{−t})/t² is 1/t² to within e^{−t}.
 */
function mixtureIntegral(): number {
  const lo = Math.log(1e-8);
  const hi = Math.log(700);
  const n = 20_000;
  const h = (hi - lo) / n;
  const g = (s: number): number => {
    const t = Math.exp(s);
    return Math.exp(mixtureLogBet(Math.exp(-t)) - t) * t; // dt = t ds
  };
  let sum = g(lo) + g(hi);
  for (let k = 1; k < n; k++) sum += (k % 2 === 1 ? 4 : 2) * g(lo + k * h);
  return (sum * h) / 3 + 0.5e-8 /* ∫₀^1e−8, integrand ½ */ + 1 / 700;
}

describe("betting functions of the conformal martingale", () => {
  it("each integrates to 1 over the p-value, so the product is a test martingale (Vovk, Nouretdinov & Gammerman 2003, from memory)", () => {
    for (const eps of [0.5, 0.92]) expect(integral((p) => Math.exp(powerLogBet(p, eps)))).toBeCloseTo(1, 3);
    expect(mixtureIntegral()).toBeCloseTo(1, 4);
    for (const shares of [[0.5, 0.5], [0.9, 0.1], [0, 1]]) {
      expect(integral((p) => Math.exp(jumperLogBet(p, 0.01, Float64Array.from(shares))))).toBeCloseTo(1, 6);
    }
  });

  it("the mixture's series near p = 1 meets its closed form", () => {
    const L = -1.0001e-3;
    const closed = Math.log((Math.exp(-L) + L - 1) / (L * L));
    expect(mixtureLogBet(Math.exp(L))).toBeCloseTo(closed, 7);
    expect(mixtureLogBet(1)).toBeCloseTo(Math.log(0.5), 15);
  });

  it("jumper shares stay a distribution and move towards the bet that pays", () => {
    const shares = Float64Array.from([0.5, 0.5]);
    for (let k = 0; k < 20; k++) jumperLogBet(0.01, 0.01, shares);
    expect(shares[0]! + shares[1]!).toBeCloseTo(1, 12);
    expect(shares[0]).toBeGreaterThan(0.9);
  });
});
