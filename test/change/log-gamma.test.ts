import { gammaln } from "simple-statistics";
import { describe, expect, it } from "vitest";
import { logGamma } from "../../packages/change/src/log-gamma.js";

describe("logGamma", () => {
  it("the @example, ln Γ(½) = ½ ln π, and agreement with simple-statistics' gammaln to 1e−12 over (0.01, 200)", () => {
    expect(logGamma(5).toFixed(12)).toBe("3.178053830348");
    expect(logGamma(0.5)).toBeCloseTo(0.5 * Math.log(Math.PI), 13);
    for (let x = 0.01; x < 200; x *= 1.37) expect(Math.abs(logGamma(x) - gammaln(x))).toBeLessThan(1e-12 * Math.max(1, Math.abs(gammaln(x))) + 1e-12);
  });
});
