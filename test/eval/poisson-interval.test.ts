import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { poissonCdf, poissonInterval } from "@leeway/eval";
import { expectLeewayError } from "../support/errors.js";

// Direct summation of the Poisson mass function, for small counts.
function directCdf(k: number, mu: number): number {
  let term = Math.exp(-mu);
  let sum = term;
  for (let j = 1; j <= k; j++) {
    term *= mu / j;
    sum += term;
  }
  return sum;
}

describe("poissonInterval", () => {
  it("the bounds put α/2 in each tail: P(X ≤ k | μ_U) = α/2 and P(X ≥ k | μ_L) = α/2", () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 200 }), fc.constantFrom(0.8, 0.9, 0.95, 0.99), (k, level) => {
        const { lower, upper } = poissonInterval(k, level);
        const alpha = 1 - level;
        expect(directCdf(k, upper)).toBeCloseTo(alpha / 2, 9);
        if (k === 0) expect(lower).toBe(0);
        else expect(1 - directCdf(k - 1, lower)).toBeCloseTo(alpha / 2, 9);
        expect(lower).toBeLessThan(k + 1e-12);
        expect(upper).toBeGreaterThan(k);
      }),
      { numRuns: 120 },
    );
  });

  it("a count of 0 gives the closed form μ_U = ln(2/α)", () => {
    expect(poissonInterval(0, 0.95).upper).toBeCloseTo(Math.log(40), 10);
    expect(poissonInterval(0, 0.9).upper).toBeCloseTo(Math.log(20), 10);
  });

  it("poissonCdf equals direct summation, and stays accurate for large means", () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 300 }), fc.double({ min: 0.01, max: 300, noNaN: true }), (k, mu) => {
        expect(poissonCdf(k, mu)).toBeCloseTo(directCdf(k, mu), 10);
      }),
    );
    // For large μ the distribution is near normal: P(X ≤ μ) → ½ + a continuity term of order 1/√μ.
    const big = poissonCdf(1_000_000, 1_000_000);
    expect(big).toBeGreaterThan(0.5);
    expect(big).toBeLessThan(0.501);
  });

  it("refuses bad counts and levels", () => {
    expectLeewayError(() => poissonInterval(-1), "E_OPTION", "count", "-1");
    expectLeewayError(() => poissonInterval(1.5), "E_OPTION", "count", "1.5");
    expectLeewayError(() => poissonInterval(3, 1), "E_OPTION", "level", "1");
    expectLeewayError(() => poissonCdf(3, -1), "E_OPTION", "mu", "-1");
  });
});
