import { describe, expect, it } from "vitest";
import { gaussianThreshold } from "@leeway/change";

describe("gaussianThreshold against published run lengths", () => {
  it("two-sided CUSUM k = 0.5, ARL0 465 → h ≈ 5 (Montgomery, Introduction to Statistical Quality Control, tabular CUSUM ARL table, k = 1/2, h = 5)", () => {
    expect(gaussianThreshold(465)).toBeGreaterThan(4.9);
    expect(gaussianThreshold(465)).toBeLessThan(5.1);
  });

  it("two-sided CUSUM k = 0.5, ARL0 168 → h ≈ 4 (same table, h = 4)", () => {
    expect(gaussianThreshold(168)).toBeGreaterThan(3.85);
    expect(gaussianThreshold(168)).toBeLessThan(4.15);
  });
});
