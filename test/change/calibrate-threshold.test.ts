import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { Adwin, calibrateThreshold, Cusum, EwmaChart, SlidingKsTest, PageHinkley, type ChangeTest } from "@leeway/change";
import { expectLeewayError } from "../support/errors.js";

const r = new RandomSource("commissioning");
// 400 skewed, autocorrelated commissioning scores (an AR(1) on the log scale)
const scores = (() => {
  const out = new Float64Array(400);
  let a = 0;
  for (let i = 0; i < out.length; i++) {
    a = 0.6 * a + 0.8 * r.normal();
    out[i] = Math.exp(-2 + 0.4 * a);
  }
  return out;
})();
const mean = scores.reduce((a, b) => a + b, 0) / scores.length;
const sigma = Math.sqrt(scores.reduce((a, b) => a + (b - mean) ** 2, 0) / (scores.length - 1));

const makers: [string, (t: number) => ChangeTest, number][] = [
  ["Cusum", (h) => new Cusum({ mean, sigma, h, direction: "up" }), 1],
  ["Cusum with burn-in", (h) => new Cusum({ burnIn: 50, h }), 1],
  ["PageHinkley", (t) => new PageHinkley({ alarmLevel: t, tolerance: 0.1 * sigma }), sigma],
  ["EwmaChart", (L) => new EwmaChart({ mean, sigma, lambda: 0.2, L }), 1],
  ["Adwin", (t) => new Adwin({ delta: 0.002, threshold: t }), 1],
  ["SlidingKsTest", (t) => new SlidingKsTest({ recentSize: 32, referenceSize: 64, criticalD: t, checkPeriod: 4 }), 0.3],
];

describe("calibrateThreshold", () => {
  for (const [name, make, initial] of makers) {
    it(`works for ${name} on 400 autocorrelated skewed scores: the estimate's interval holds the target 200 up to the search's noise`, () => {
      const result = calibrateThreshold(make, scores, { targetArl0: 200, seed: name, replicates: 100, blockLength: 20, initial });
      expect(result.threshold).toBeGreaterThan(0);
      expect(result.replicates).toBe(100);
      expect(result.interval[0]).toBeLessThan(result.arl0);
      expect(result.interval[1]).toBeGreaterThan(result.arl0);
      // independent streams: within four standard errors (1/√100 each for search and estimate) of the target
      expect(Math.abs(Math.log(result.arl0 / 200))).toBeLessThan(0.6);
    });
  }

  it("is deterministic for a seed, and a different seed gives different streams", () => {
    const make = (h: number): ChangeTest => new Cusum({ mean, sigma, h });
    const a = calibrateThreshold(make, scores, { targetArl0: 100, seed: 5, replicates: 50 });
    const b = calibrateThreshold(make, scores, { targetArl0: 100, seed: 5, replicates: 50 });
    const c = calibrateThreshold(make, scores, { targetArl0: 100, seed: 6, replicates: 50 });
    expect(b).toEqual(a);
    expect(c.arl0).not.toBe(a.arl0);
  });

  it("a higher target gives a higher threshold", () => {
    const make = (h: number): ChangeTest => new Cusum({ mean, sigma, h, direction: "up" });
    const low = calibrateThreshold(make, scores, { targetArl0: 100, seed: 1, replicates: 50 });
    const high = calibrateThreshold(make, scores, { targetArl0: 1000, seed: 1, replicates: 50 });
    expect(high.threshold).toBeGreaterThan(low.threshold);
  });

  it("censors runs at maxRunLength and still estimates the ARL0 (censored geometric likelihood)", () => {
    const make = (h: number): ChangeTest => new Cusum({ mean, sigma, h, direction: "up" });
    const result = calibrateThreshold(make, scores, { targetArl0: 300, seed: 2, replicates: 100, maxRunLength: 300 });
    expect(result.censored).toBeGreaterThan(0);
    expect(Number.isFinite(result.arl0)).toBe(true);
    expect(result.interval[1]).toBeGreaterThan(result.interval[0]);
  });

  it("says so when no threshold reaches the target (a test that alarms at once)", () => {
    const always = (t: number): ChangeTest => new SlidingKsTest({ referenceSample: [1, 2, 3, 4, 5, 6, 7, 8], recentSize: 8, criticalD: Math.min(0.99, t / (1 + t)) });
    expectLeewayError(() => calibrateThreshold(always, new Float64Array(100).fill(50), { targetArl0: 1000, seed: 1, replicates: 10 }), "E_STATE", "no threshold up to");
  });

  it("refuses bad arguments naming them: E_OPTION for options, E_NON_FINITE or E_SAMPLE for a score", () => {
    const make = (h: number): ChangeTest => new Cusum({ mean, sigma, h });
    const base = { targetArl0: 100, seed: 1 };
    expectLeewayError(() => calibrateThreshold(null as unknown as typeof make, scores, base), "E_OPTION", "makeTest");
    expectLeewayError(() => calibrateThreshold(make, [1, 2, 3], base), "E_OPTION", "referenceScores");
    expectLeewayError(() => calibrateThreshold(make, [...scores, Number.NaN], base), "E_NON_FINITE", "referenceScores[400]");
    expectLeewayError(() => calibrateThreshold(make, scores, { ...base, targetArl0: 1 }), "E_OPTION", "targetArl0");
    expectLeewayError(() => calibrateThreshold(make, scores, { targetArl0: 100 } as typeof base), "E_OPTION", "seed");
    expectLeewayError(() => calibrateThreshold(make, scores, { ...base, replicates: 5 }), "E_OPTION", "replicates");
    expectLeewayError(() => calibrateThreshold(make, scores, { ...base, blockLength: 300 }), "E_OPTION", "blockLength");
    expectLeewayError(() => calibrateThreshold(make, scores, { ...base, maxRunLength: 50 }), "E_OPTION", "maxRunLength");
    expectLeewayError(() => calibrateThreshold(make, scores, { ...base, lower: 3, upper: 2 }), "E_OPTION", "upper");
    expectLeewayError(() => calibrateThreshold(make, scores, { ...base, initial: 0 }), "E_OPTION", "initial");
    expectLeewayError(() => calibrateThreshold(make, scores, { ...base, runs: 3 } as typeof base), "E_OPTION", "runs");
  });
});
