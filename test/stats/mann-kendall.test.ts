import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { mannKendall, theilSenSlope } from "@leeway/stats";
import { mannKendallVariance } from "../../packages/stats/src/mann-kendall.js";
import { expectLeewayError } from "../support/errors.js";
import { mannKendallBrute } from "./brute-force.js";

describe("mannKendall and theilSenSlope", () => {
  it("S and the tie-corrected variance equal a brute-force enumeration", () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 0, max: 5 }), { maxLength: 60 }), (values) => {
        const r = mannKendall(values);
        const ref = mannKendallBrute(values);
        expect(r.s).toBe(ref.s);
        expect(r.n).toBe(values.length);
        if (values.length >= 2) expect(r.variance).toBe(ref.variance);
      }),
      { numRuns: 200 },
    );
  });

  it("a strictly increasing series has S = n(n−1)/2 and no ties", () => {
    const r = mannKendall([1, 2, 3, 4, 5, 6]);
    expect(r.s).toBe(15);
    expect(r.variance).toBe(mannKendallVariance(6, 0));
    expect(r.pValue).toBeLessThan(0.01);
  });

  it("Theil-Sen recovers the slope of a line exactly and ignores a minority of wild points", () => {
    fc.assert(
      fc.property(fc.integer({ min: -50, max: 50 }), fc.integer({ min: -100, max: 100 }), fc.integer({ min: 5, max: 40 }), (b, a, n) => {
        const line = Array.from({ length: n }, (_, i) => a + b * i);
        expect(theilSenSlope(line)).toBe(b);
        line[1] = 1e9;
        expect(theilSenSlope(line)).toBe(b);
      }),
      { numRuns: 100 },
    );
    expect(theilSenSlope([1])).toBeNaN();
  });

  it("refuses non-finite values and non-arrays", () => {
    expectLeewayError(() => theilSenSlope([1, Infinity]), "E_NON_FINITE", "values[1]");
    expectLeewayError(() => mannKendall(3 as never), "E_SAMPLE", "values", "got 3");
  });
});
