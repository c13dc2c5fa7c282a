import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { kendallUpperTail, mannKendall, SEN_EXACT_UP_TO, senSlopeInterval } from "@leeway/stats";
import { expectLeewayError } from "../support/errors.js";


/** Noise laws for the coverage checks: normal, uniform, Laplace and a skewed centred exponential. */
const NOISE: Record<string, (r: RandomSource) => number> = {
  normal: (r) => r.normal(),
  uniform: (r) => r.uniform(-1.7, 1.7),
  laplace: (r) => (r.next() < 0.5 ? -1 : 1) * r.exponential(1),
  exponential: (r) => r.exponential(1) - 1,
};

describe("senSlopeInterval", () => {
  it("the @example", () => {
    const r = senSlopeInterval([1.0, 2.2, 2.9, 4.3, 4.8, 6.1, 7.2, 7.9, 9.3, 9.9], { confidence: 0.9 });
    expect([r.slope.toFixed(3), r.lower.toFixed(3), r.upper.toFixed(3), r.method]).toEqual(["1.000", "0.950", "1.050", "exact"]);
  });

  it("holds exactly the slopes b whose detrended series x_i − b·i passes the exact Mann–Kendall test (Sen 1968, the interval's definition, from memory)", () => {
    fc.assert(
      fc.property(fc.uniqueArray(fc.integer({ min: -500, max: 500 }), { minLength: 6, maxLength: 14 }), fc.double({ min: 0.6, max: 0.98, noNaN: true }), (noise, confidence) => {
        const xs = noise.map((e, i) => 0.3 * i + e / 100);
        const r = senSlopeInterval(xs, { confidence });
        fc.pre(Number.isFinite(r.lower) && Number.isFinite(r.upper) && r.method === "exact");
        const n = xs.length;
        const pairs = (n * (n - 1)) / 2;
        const tail = kendallUpperTail(n);
        // the acceptance region |S| ≤ C, C the smallest with P(S > C) ≤ α/2
        let c = pairs;
        while (c - 2 >= 0 && (tail[(pairs - c + 2) / 2 - 1] as number) <= (1 - confidence) / 2) c -= 2;
        const accepts = (b: number): boolean => Math.abs(mannKendall(xs.map((x, i) => x - b * i)).s) <= c;
        const width = r.upper - r.lower;
        expect(accepts(r.slope), `slope ${JSON.stringify({ xs, confidence, r, c })}`).toBe(true);
        expect(accepts(r.lower + 1e-9 * (1 + Math.abs(r.lower)))).toBe(true);
        expect(accepts(r.upper - 1e-9 * (1 + Math.abs(r.upper)))).toBe(true);
        expect(accepts(r.lower - 1e-6 * (1 + width))).toBe(false);
        expect(accepts(r.upper + 1e-6 * (1 + width))).toBe(false);
      }),
      { numRuns: 150 },
    );
  });

  it("a 90 % interval covers the true slope of a line plus i.i.d. noise of four laws in ≥ 90 % of 600 series each, within 3 binomial standard errors (Sen 1968: exact for continuous i.i.d. errors, from memory)", () => {
    for (const [law, draw] of Object.entries(NOISE)) {
      const rng = new RandomSource(`sen-coverage-${law}`);
      for (const n of [12, 40]) {
        let covered = 0;
        let attained = 0;
        const runs = 600;
        for (let k = 0; k < runs; k++) {
          const xs = Array.from({ length: n }, (_, i) => 0.05 * i + draw(rng));
          const r = senSlopeInterval(xs, { confidence: 0.9 });
          attained = r.attained;
          if (r.lower <= 0.05 && 0.05 <= r.upper) covered++;
        }
        const target = n <= SEN_EXACT_UP_TO ? attained : 0.9;
        const se = Math.sqrt((target * (1 - target)) / runs);
        expect(covered / runs, `${law}, n = ${n}`).toBeGreaterThan(target - 3 * se);
        expect(covered / runs, `${law}, n = ${n}`).toBeLessThan(target + 3 * se);
      }
    }
  });

  it("past the exact range and with ties it uses z·√Var(S) and still covers about 90 % (Gilbert 1987, §16.5.1, from memory)", () => {
    const rng = new RandomSource("sen-normal-path");
    let covered = 0;
    const runs = 300;
    for (let k = 0; k < runs; k++) {
      const xs = Array.from({ length: 120 }, (_, i) => Math.round(10 * (0.02 * i + rng.normal())) / 10); // rounded: ties
      const r = senSlopeInterval(xs, { confidence: 0.9 });
      expect(r.method).toBe("normal");
      if (r.lower <= 0.02 && 0.02 <= r.upper) covered++;
    }
    expect(covered / runs).toBeGreaterThan(0.9 - 3 * Math.sqrt(0.09 / runs));
    expect(covered / runs).toBeLessThan(0.9 + 3 * Math.sqrt(0.09 / runs));
  });

  it("the exact and normal intervals nearly agree at n = 60, and a level too high for few points gives an unbounded interval", () => {
    const xs = Array.from({ length: 60 }, (_, i) => 0.1 * i + Math.sin(i * 12.9898) * 2);
    const exact = senSlopeInterval(xs, { confidence: 0.9 });
    const normal = senSlopeInterval(xs.concat([6.5]), { confidence: 0.9 });
    expect(exact.method).toBe("exact");
    expect(normal.method).toBe("normal");
    expect(Math.abs(exact.upper - exact.lower - (normal.upper - normal.lower)) / (exact.upper - exact.lower)).toBeLessThan(0.15);
    const few = senSlopeInterval([1, 2, 3], { confidence: 0.99 });
    expect([few.lower, few.upper]).toEqual([-Infinity, Infinity]);
    expect(few.attained).toBe(1);
  });

  it("refuses bad input naming the parameter", () => {
    expectLeewayError(() => senSlopeInterval([1]), "E_OPTION", "values");
    expectLeewayError(() => senSlopeInterval([1, Number.NaN, 2]), "E_NON_FINITE", "values[1]");
    expectLeewayError(() => senSlopeInterval([1, 2, 3], { confidence: 1 }), "E_OPTION", "confidence", "1");
    expectLeewayError(() => senSlopeInterval("abc" as never), "E_SAMPLE", "values", "(string)");
    expectLeewayError(() => senSlopeInterval(new Float64Array(4097)), "E_OPTION", "values", "4096");
  });
});
