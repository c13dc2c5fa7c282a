import { describe, expect, it } from "vitest";
import { normalCdf } from "@leeway/change";

describe("normalCdf", () => {
  it("matches Φ(−3) = 0.0013498980316301 and Φ(1.96) = 0.9750021048517795 (Abramowitz & Stegun, Table 26.1, from memory)", () => {
    expect(normalCdf(-3)).toBeCloseTo(0.0013498980316301, 15);
    expect(normalCdf(1.96)).toBeCloseTo(0.9750021048517795, 14);
  });

  it("is symmetric, Φ(x) + Φ(−x) = 1, across the series/continued-fraction switch at |x| = 3√2", () => {
    for (const x of [0, 0.3, 2, 4.2, 4.25, 4.3, 6, 8]) expect(normalCdf(x) + normalCdf(-x)).toBeCloseTo(1, 14);
    expect(normalCdf(-4.2426)).toBeGreaterThan(normalCdf(-4.2427));
  });
});
