import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { reduceBins } from "@leeway/signal";
import { expectLeewayError } from "../support/errors.js";

describe("reduceBins", () => {
  it("sum mode preserves the total; mean mode of equal groups equals sum / width", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: 0, max: 100, noNaN: true }), { minLength: 1, maxLength: 600 }), fc.integer({ min: 1, max: 600 }), (xs, b) => {
        const values = Float64Array.from(xs);
        const bins = Math.min(b, values.length);
        const sums = reduceBins(values, bins, new Float64Array(bins), "sum");
        const total = values.reduce((s, v) => s + v, 0);
        expect(Math.abs(sums.reduce((s, v) => s + v, 0) - total)).toBeLessThanOrEqual(1e-9 * Math.max(1, total));
        if (values.length % bins === 0) {
          const means = reduceBins(values, bins);
          const width = values.length / bins;
          for (let g = 0; g < bins; g++) expect(means[g]).toBeCloseTo((sums[g] as number) / width, 9);
        }
      }),
    );
  });

  it("512 bins to 256 averages pairs; uneven groups follow floor(b·L/B)", () => {
    const values = Float64Array.from({ length: 512 }, (_, i) => i);
    const out = reduceBins(values, 256);
    expect(out[0]).toBe(0.5);
    expect(out[255]).toBe(510.5);
    expect(Array.from(reduceBins(Float64Array.from([1, 2, 3, 4, 5]), 2))).toEqual([1.5, 4]);
  });

  it("refuses empty input, bin counts outside [1, L] and a wrong out length", () => {
    expectLeewayError(() => reduceBins(new Float64Array(0), 1), "E_OPTION", "values");
    expectLeewayError(() => reduceBins(new Float64Array(4), 5), "E_OPTION", "bins", "[1, 4]");
    expectLeewayError(() => reduceBins(new Float64Array(4), 0), "E_OPTION", "bins");
    expectLeewayError(() => reduceBins(new Float64Array(4), 2, new Float64Array(3)), "E_DIMENSION", "out");
    expectLeewayError(() => reduceBins(new Float64Array(4), 2, new Float64Array(2), "max" as never), "E_OPTION", "how");
  });
  it("the documented example: [1, 3, 5, 7] to 2 bins is [2, 6]", () => {
    expect(Array.from(reduceBins(Float64Array.from([1, 3, 5, 7]), 2))).toEqual([2, 6]);
  });
});
