import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { kolmogorovSurvival, ksTwoSample } from "@leeway/stats";
import { SlidingKsTest } from "@leeway/change";
import { expectLeewayError, throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";
import { expectRestoreContinues, expectScanEqualsObserve } from "./laws.js";

describe("SlidingKsTest", () => {
  it("D and the p-value equal a two-sample KS test of the reference against the last w samples", () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 0, max: 12 }), { minLength: 40, maxLength: 120 }), fc.integer({ min: 8, max: 20 }), (xs, w) => {
        const ks = new SlidingKsTest({ recentSize: w, referenceSize: 16, significance: 0.01 });
        xs.forEach((x, t) => {
          const reading = ks.observe(x);
          if (t < 16 + w - 1) return;
          const expected = ksTwoSample(xs.slice(0, 16), xs.slice(t - w + 1, t + 1));
          expect(reading.statistic).toBeCloseTo(expected.d, 12);
          expect(reading.pValue).toBeCloseTo(expected.pValue, 12);
          expect(reading.status === "change").toBe(expected.pValue < 0.01);
        });
      }),
      { numRuns: 60 },
    );
  });

  it("the critical value D_α solves Q_KS(√(nw/(n + w))·D_α) = α", () => {
    const ks = new SlidingKsTest({ recentSize: 50, referenceSize: 200, significance: 0.01 });
    const scale = Math.sqrt((200 * 50) / 250);
    expect(kolmogorovSurvival(scale * ks.threshold)).toBeCloseTo(0.01, 10);
  });

  it("a given reference is used from the first sample; the direction says which way the recent sample moved", () => {
    const ks = new SlidingKsTest({ referenceSample: Array.from({ length: 30 }, (_, i) => i), recentSize: 10, significance: 0.01 });
    const up = ks.scan(new Float64Array(10).fill(100));
    expect(up).toBe(9);
    ks.restart();
    const readings = Array.from({ length: 10 }, () => ks.observe(-5));
    expect(readings[9]).toMatchObject({ status: "change", direction: "down", statistic: 1, onset: 10 });
  });

  it("scan equals observe sample for sample (same changes, same state)", () => {
    expectScanEqualsObserve(() => new SlidingKsTest({ recentSize: 12, referenceSize: 20, significance: 0.05 }));
    expectScanEqualsObserve(() => new SlidingKsTest({ recentSize: 8, referenceSample: [0, 1, 2, 3, 4, 5, 6, 7, 8], checkPeriod: 3, nonFinite: "skip" }));
  });

  it("snapshot mid-stream restores and continues identically", () => {
    const r = new RandomSource(3);
    const xs = Float64Array.from({ length: 600 }, (_, i) => r.normal() + (i > 400 ? 1 : 0));
    expectRestoreContinues(() => new SlidingKsTest({ recentSize: 64, referenceSize: 128 }), SlidingKsTest.restore, xs);
    expectRestoreContinues(() => new SlidingKsTest({ recentSize: 64, referenceSize: 400 }), SlidingKsTest.restore, xs);
  });

  it("refuses every bad option with E_OPTION naming it, and non-finite samples with E_NON_FINITE", () => {
    expectLeewayError(() => new SlidingKsTest({ recentSize: 4 }), "E_OPTION", "recentSize", "4");
    expectLeewayError(() => new SlidingKsTest({ referenceSize: 2 }), "E_OPTION", "referenceSize");
    expectLeewayError(() => new SlidingKsTest({ referenceSample: [1, 2, 3] }), "E_OPTION", "referenceSample");
    expectLeewayError(() => new SlidingKsTest({ referenceSample: [1, 2, 3, 4, 5, 6, 7, Number.NaN] }), "E_OPTION", "referenceSample[7]");
    expectLeewayError(() => new SlidingKsTest({ referenceSample: [1, 2, 3, 4, 5, 6, 7, 8], referenceSize: 8 }), "E_OPTION", "referenceSize");
    expectLeewayError(() => new SlidingKsTest({ significance: 1 }), "E_OPTION", "significance");
    expectLeewayError(() => new SlidingKsTest({ criticalD: 0 }), "E_OPTION", "criticalD");
    expectLeewayError(() => new SlidingKsTest({ checkPeriod: 0 }), "E_OPTION", "checkPeriod");
    expectLeewayError(() => new SlidingKsTest({ size: 3 } as object), "E_OPTION", "size");
    expectLeewayError(() => new SlidingKsTest().observe(Number.NaN), "E_NON_FINITE", "x");
  });

  it("refuses corrupted snapshots", () => {
    const collecting = new SlidingKsTest({ recentSize: 10, referenceSize: 30 });
    collecting.scan(Float64Array.from({ length: 20 }, (_, i) => Math.sin(i)));
    expectRefusesCorruptions(SlidingKsTest.restore, collecting.snapshot(), { variableLengthPaths: [["reference"], ["recent"]] });
    const sliding = new SlidingKsTest({ recentSize: 10, referenceSize: 12 });
    sliding.scan(Float64Array.from({ length: 40 }, (_, i) => Math.sin(i)));
    expectRefusesCorruptions(SlidingKsTest.restore, sliding.snapshot(), { variableLengthPaths: [["reference"], ["recent"]] });
  });

  it("refuses snapshots whose buffers disagree with their counts: a truncated reference, or a statistic before the recent window was full (common practice, no source)", () => {
    const collecting = new SlidingKsTest({ recentSize: 10, referenceSize: 30 });
    collecting.scan(Float64Array.from({ length: 20 }, (_, i) => Math.sin(i)));
    const cut = throughJson(collecting.snapshot());
    cut.state.reference = cut.state.reference.slice(0, 15);
    expectLeewayError(() => SlidingKsTest.restore(cut), "E_SNAPSHOT", "reference", "15");
    const sliding = new SlidingKsTest({ recentSize: 10, referenceSize: 12 });
    sliding.scan(Float64Array.from({ length: 40 }, (_, i) => Math.sin(i)));
    const short = throughJson(sliding.snapshot());
    short.state.recent = short.state.recent.slice(0, 6);
    expectLeewayError(() => SlidingKsTest.restore(short), "E_SNAPSHOT", "statistic");
    sliding.restart();
    expect(() => SlidingKsTest.restore(throughJson(sliding.snapshot()))).not.toThrow();
  });
});
