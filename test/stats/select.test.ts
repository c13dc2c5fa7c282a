import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { medianInPlace, selectInPlace } from "../../packages/stats/src/select.js";

describe("selection", () => {
  it("selectInPlace returns the k-th smallest, as sorting would", () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: -20, max: 20 }), { minLength: 1, maxLength: 200 }), fc.nat(), (values, k0) => {
        const k = k0 % values.length;
        const sorted = [...values].sort((a, b) => a - b);
        expect(selectInPlace(Float64Array.from(values), k)).toBe(sorted[k]);
      }),
      { numRuns: 300 },
    );
  });

  it("medianInPlace equals the middle of the sorted values (mean of the two middle ones for an even count)", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 1, maxLength: 200 }), (values) => {
        const sorted = [...values].sort((a, b) => a - b);
        const m = sorted.length;
        const expected = m % 2 === 1 ? (sorted[(m - 1) / 2] as number) : (sorted[m / 2 - 1] as number) + ((sorted[m / 2] as number) - (sorted[m / 2 - 1] as number)) / 2;
        expect(medianInPlace(Float64Array.from(values))).toBe(expected);
      }),
      { numRuns: 300 },
    );
    expect(medianInPlace(new Float64Array(0))).toBeNaN();
  });
});
