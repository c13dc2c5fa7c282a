import { poissonDistribution } from "simple-statistics";
import { describe, expect, it } from "vitest";
import { poissonCdf, poissonInterval } from "@leeway/eval";

describe("exact Poisson interval against references", () => {
  it("95% Garwood limits for k = 0, 1, 2, 5, 10 (Garwood 1936; the standard table of exact Poisson limits, from memory)", () => {
    const table: [number, number, number][] = [
      [0, 0, 3.689],
      [1, 0.0253, 5.572],
      [2, 0.242, 7.225],
      [5, 1.623, 11.668],
      [10, 4.795, 18.39],
    ];
    for (const [k, lower, upper] of table) {
      const interval = poissonInterval(k, 0.95);
      expect(interval.lower).toBeCloseTo(lower, lower < 0.1 ? 4 : 2);
      expect(interval.upper).toBeCloseTo(upper, 2);
    }
  });

  it("poissonCdf equals the cumulative sum of simple-statistics poissonDistribution", () => {
    for (const mu of [0.5, 2, 7.5, 30]) {
      const cells = poissonDistribution(mu) as number[];
      let cumulative = 0;
      for (let k = 0; k < Math.min(cells.length, 60); k++) {
        cumulative += cells[k] as number;
        expect(poissonCdf(k, mu)).toBeCloseTo(cumulative, 10);
      }
    }
  });
});
