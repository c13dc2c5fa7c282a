import fc from "fast-check";
import * as ss from "simple-statistics";
import { describe, expect, it } from "vitest";
import { crestFactor, kurtosis, peak, rms, skewness, timeFeatures } from "@leeway/signal";
import { expectLeewayError } from "../support/errors.js";

describe("timeFeatures", () => {
  it("matches simple-statistics' population moments (RMS, skewness, kurtosis = excess + 3)", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -100, max: 100, noNaN: true }), { minLength: 4, maxLength: 200 }), (xs) => {
        const frame = Float64Array.from(xs);
        const f = timeFeatures(frame);
        const sd = ss.standardDeviation(xs);
        fc.pre(sd > 1e-6);
        expect(f.rms).toBeCloseTo(ss.rootMeanSquare(xs), 9);
        expect(f.mean).toBeCloseTo(ss.mean(xs), 9);
        expect(f.peak).toBe(Math.max(...xs.map(Math.abs)));
        // simple-statistics' sampleSkewness uses the unbiased m2; compare the population form directly
        const m = ss.mean(xs);
        const m2 = ss.mean(xs.map((x) => (x - m) ** 2));
        const m3 = ss.mean(xs.map((x) => (x - m) ** 3));
        const m4 = ss.mean(xs.map((x) => (x - m) ** 4));
        expect(f.skewness).toBeCloseTo(m3 / m2 ** 1.5, 8);
        expect(f.kurtosis).toBeCloseTo(m4 / (m2 * m2), 8);
      }),
      { numRuns: 80 },
    );
  });

  it("the one-value helpers agree with timeFeatures", () => {
    const x = Float64Array.from([1, -2, 3, 0.5, -4]);
    const f = timeFeatures(x);
    expect([rms(x), peak(x), crestFactor(x), skewness(x), kurtosis(x)]).toEqual([f.rms, f.peak, f.crestFactor, f.skewness, f.kurtosis]);
  });

  it("a constant frame has zero skewness and kurtosis by convention; an empty or non-finite frame is refused", () => {
    const f = timeFeatures(Float64Array.from([2, 2, 2]));
    expect([f.skewness, f.kurtosis, f.crestFactor]).toEqual([0, 0, 1]);
    expectLeewayError(() => timeFeatures(new Float64Array(0)), "E_OPTION", "frame");
    expectLeewayError(() => timeFeatures(Float64Array.from([1, Number.POSITIVE_INFINITY])), "E_NON_FINITE", "frame[1]");
  });
});
