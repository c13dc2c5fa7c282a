import { describe, expect, it } from "vitest";
import { mean, quantile, sampleStandardDeviation } from "simple-statistics";
import { levelOf, normalised, quantileOf, MIN_SPREAD } from "../../packages/policy/src/calibration.js";

describe("score levels", () => {
  const us = Float64Array.from([-3.2, -2.9, -3.5, -3.1, -2.7, -3.3, -3.0, -2.8]);

  it("levelOf is the mean and sample standard deviation (checked against simple-statistics)", () => {
    const l = levelOf(us);
    expect(l.mean).toBeCloseTo(mean([...us]), 12);
    expect(l.spread).toBeCloseTo(sampleStandardDeviation([...us]), 12);
    expect(levelOf(Float64Array.of(1, 1, 1)).spread).toBe(MIN_SPREAD);
  });

  it("quantileOf interpolates between order statistics like simple-statistics' quantileSorted of type 7", () => {
    const sorted = [...us].sort((a, b) => a - b);
    for (const q of [0, 0.25, 0.5, 0.9, 0.99, 1]) {
      const h = (sorted.length - 1) * q;
      const expected = (sorted[Math.floor(h)] as number) + (h - Math.floor(h)) * ((sorted[Math.min(sorted.length - 1, Math.floor(h) + 1)] as number) - (sorted[Math.floor(h)] as number));
      expect(quantileOf(us, q)).toBeCloseTo(expected, 12);
    }
    expect(quantileOf(us, 0.5)).toBeCloseTo(quantile([...us], 0.5), 12);
  });

  it("normalised clips to ±clip", () => {
    const l = { mean: 0, spread: 0.5 };
    expect([normalised(1, l, 6), normalised(10, l, 6), normalised(-10, l, 6)]).toEqual([2, 6, -6]);
  });
});
