import { describe, expect, it } from "vitest";
import { mannKendall, theilSenSlope, WindowTrend } from "@leeway/stats";

// "A Mann-Kendall Example ('By Hand')", mathcs.holycross.edu/~little/Montserrat/MannKendallByHand.txt
const BY_HAND = [12.9, 14.8, 13.2, 15.7, 13.8, 15.6, 12.9, 11.0, 17.3, 15.9, 19.0, 18.3, 20.1, 21.7];

describe("Mann-Kendall and Theil-Sen against a worked example", () => {
  it("S = 54, Var(S) = 332.667 with one tie pair, Z = 2.9058, one-sided p ≈ 0.0018 (Mann-Kendall example 'by hand', Holy Cross, MannKendallByHand.txt)", () => {
    const r = mannKendall(BY_HAND);
    expect(r.s).toBe(54);
    expect(r.variance).toBeCloseTo(332.667, 3);
    expect(r.z).toBeCloseTo(2.9058, 4);
    expect(r.pValue / 2).toBeCloseTo(0.0018, 4); // the example's one-sided p; ours is two-sided
  });

  it("the sliding window gives the same S, variance and z once it holds the 14 points (same source)", () => {
    const t = new WindowTrend({ width: 14 });
    for (const x of [99, 98, 97]) t.observe(x); // pushed out again by the 14 example points
    let reading = t.observe(BY_HAND[0] as number);
    for (const x of BY_HAND.slice(1)) reading = t.observe(x);
    expect(reading.s).toBe(54);
    expect(reading.variance).toBeCloseTo(332.667, 3);
    expect(reading.z).toBeCloseTo(2.9058, 4);
  });

  it("Theil-Sen slope of the example is 17/30 per step (median of the 91 pairwise slopes; computed independently, no published worked example)", () => {
    expect(theilSenSlope(BY_HAND)).toBeCloseTo(17 / 30, 12);
    const t = new WindowTrend({ width: 14 });
    t.observeMany(Float64Array.from(BY_HAND));
    expect(t.slope()).toBeCloseTo(17 / 30, 12);
  });
});
