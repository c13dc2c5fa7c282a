import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { kolmogorovSurvival, ksTwoSample } from "@leeway/stats";
import { ksStatisticSorted } from "../../packages/stats/src/ks-two-sample.js";
import { expectLeewayError } from "../support/errors.js";
import { ksBrute } from "./brute-force.js";

// Small integer-valued samples make ties common, which is where D is easy to get wrong.
const tiedSample = fc.array(fc.integer({ min: 0, max: 12 }).map((v) => v / 4), { minLength: 1, maxLength: 60 });
const realSample = fc.array(fc.double({ min: -100, max: 100, noNaN: true }), { minLength: 1, maxLength: 80 });

describe("ksTwoSample", () => {
  it("D equals a brute-force evaluation of both empirical distribution functions, ties included", () => {
    fc.assert(
      fc.property(fc.oneof(tiedSample, realSample), fc.oneof(tiedSample, realSample), (a, b) => {
        const r = ksTwoSample(a, b);
        expect(r.d).toBe(ksBrute(a, b));
        expect(r.n).toBe(a.length);
        expect(r.m).toBe(b.length);
        expect(r.lambda).toBeCloseTo(Math.sqrt((a.length * b.length) / (a.length + b.length)) * r.d, 12);
        expect(r.pValue).toBe(kolmogorovSurvival(r.lambda));
      }),
      { numRuns: 200 },
    );
  });

  it("D is symmetric in its arguments and 0 for identical samples", () => {
    fc.assert(
      fc.property(tiedSample, tiedSample, (a, b) => {
        expect(ksTwoSample(a, b).d).toBe(ksTwoSample(b, a).d);
        expect(ksTwoSample(a, a).d).toBe(0);
        expect(ksTwoSample(a, a).pValue).toBe(1);
      }),
      { numRuns: 100 },
    );
  });

  it("does not change its inputs and accepts typed arrays", () => {
    const a = Float64Array.from([3, 1, 2]);
    const r = ksTwoSample(a, [10, 11]);
    expect(Array.from(a)).toEqual([3, 1, 2]);
    expect(r.d).toBe(1);
    expect(ksStatisticSorted(Float64Array.from([1, 2, 3]), Float64Array.from([10, 11]))).toBe(1);
  });

  it("refuses empty and non-finite samples", () => {
    expectLeewayError(() => ksTwoSample([], [1]), "E_OPTION", "a", "non-empty");
    expectLeewayError(() => ksTwoSample([1], [2, Number.NaN]), "E_NON_FINITE", "b[1]", "NaN");
    expectLeewayError(() => ksTwoSample([1, "2" as unknown as number], [2]), "E_SAMPLE", "a[1]", "(string)");
    expectLeewayError(() => ksTwoSample(null as unknown as number[], [2]), "E_SAMPLE", "a", "(null)");
  });
});

describe("kolmogorovSurvival", () => {
  it("is a survival function: 1 at 0, decreasing, tending to 0", () => {
    expect(kolmogorovSurvival(0)).toBe(1);
    expect(kolmogorovSurvival(Infinity)).toBe(0);
    let previous = 1;
    for (let lambda = 0.05; lambda < 4; lambda += 0.01) {
      const q = kolmogorovSurvival(lambda);
      expect(q).toBeLessThanOrEqual(previous);
      expect(q).toBeGreaterThanOrEqual(0);
      previous = q;
    }
    expect(kolmogorovSurvival(4)).toBeLessThan(1e-12);
  });

  it("its two series agree where they switch (λ = 1.18)", () => {
    // Both forms are exact; summing the alternating series just below the switch must match the Jacobi form just above it closely.
    const below = kolmogorovSurvival(1.18 - 1e-12);
    const above = kolmogorovSurvival(1.18);
    expect(Math.abs(below - above)).toBeLessThan(1e-11);
  });

  it("refuses a negative or non-numeric λ", () => {
    expectLeewayError(() => kolmogorovSurvival(-1), "E_OPTION", "lambda", "-1");
    expectLeewayError(() => kolmogorovSurvival(Number.NaN), "E_OPTION", "lambda", "NaN");
  });
});
