import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { kolmogorovSurvival, ksTwoSample } from "@leeway/stats";
import { SlidingKsTest } from "@leeway/change";
import { expectLeewayError, throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";
import { expectRestoreContinues, expectScanEqualsObserve } from "./laws.js";

/** D of two samples by an exact merge: the largest |i·m − j·n| over the union's values, as an integer key (ties stepped together). */
function bruteKey(reference: number[], recent: number[]): { high: number; low: number } {
  const a = [...reference].sort((x, y) => x - y);
  const b = [...recent].sort((x, y) => x - y);
  const n = a.length;
  const m = b.length;
  let high = 0;
  let low = 0;
  for (const v of [...a, ...b]) {
    const i = a.filter((x) => x <= v).length;
    const j = b.filter((y) => y <= v).length;
    high = Math.max(high, i * m - j * n);
    low = Math.max(low, j * n - i * m);
  }
  return { high, low };
}

/** D by the merge the test ran before its gaps were kept in trees: i/n − j/m formed in floating point. */
function mergeD(reference: number[], recent: number[]): number {
  const a = Float64Array.from(reference).sort();
  const b = Float64Array.from(recent).sort();
  const invN = 1 / a.length;
  const invM = 1 / b.length;
  let i = 0;
  let j = 0;
  let d = 0;
  while (i < a.length && j < b.length) {
    const v = Math.min(a[i] as number, b[j] as number);
    while (i < a.length && a[i] === v) i++;
    while (j < b.length && b[j] === v) j++;
    d = Math.max(d, Math.abs(i * invN - j * invM));
  }
  return d;
}

describe("SlidingKsTest", () => {
  it("D is the exact largest gap of a brute-force comparison of the two windows (bit for bit), within 1e-15 of a floating-point merge (p-value within 1e-12), at every sample, through restarts and check periods", () => {
    const stream = fc.array(fc.oneof(fc.integer({ min: -6, max: 6 }), fc.double({ min: -3, max: 3, noNaN: true })), { minLength: 30, maxLength: 160 });
    fc.assert(
      fc.property(stream, fc.integer({ min: 8, max: 24 }), fc.integer({ min: 8, max: 30 }), fc.integer({ min: 1, max: 4 }), fc.integer({ min: 20, max: 200 }), (xs, w, n, period, restartAt) => {
        const ks = new SlidingKsTest({ recentSize: w, referenceSize: n, checkPeriod: period, criticalD: 2 });
        let windowStart = n;
        let sinceCheck = 0;
        let expected = 0;
        let direction = "up";
        let mergeP = 1;
        const scale = Math.sqrt((n * w) / (n + w));
        xs.forEach((x, t) => {
          if (t === restartAt) {
            ks.restart();
            windowStart = Math.max(t, n); // the reference keeps filling through a restart
            expected = 0;
          }
          const reading = ks.observe(x);
          const held = t + 1 - windowStart;
          if (held < w) return;
          sinceCheck = held === w ? 0 : sinceCheck + 1;
          if (sinceCheck % period === 0) {
            const reference = xs.slice(0, n);
            const recent = xs.slice(t - w + 1, t + 1);
            const key = bruteKey(reference, recent);
            expected = Math.max(key.high, key.low) / (n * w);
            direction = key.high >= key.low ? "up" : "down";
            const merged = mergeD(reference, recent);
            expect(Math.abs(expected - merged)).toBeLessThanOrEqual(1e-15);
            mergeP = merged > 0 ? kolmogorovSurvival(scale * merged) : 1;
          }
          expect(reading.statistic).toBe(expected);
          expect(Math.abs(reading.pValue - mergeP)).toBeLessThanOrEqual(1e-12);
          if (expected > 0) expect(reading.direction).toBe(direction);
        });
      }),
      { numRuns: 150 },
    );
  });

  it("threshold at α = 0.01 for n = 15 against w = 28 is the published D_α = 0.522, and a window past it alarms while one short of it does not (two-sample KS critical values table, 'Critical Values for the Two-sample Kolmogorov-Smirnov test (2-sided)', large-sample example)", () => {
    const reference = Array.from({ length: 15 }, (_, i) => i);
    const ks = new SlidingKsTest({ referenceSample: reference, recentSize: 28, significance: 0.01 });
    expect(ks.threshold).toBeCloseTo(0.522, 2);
    // 17 of 28 recent values above the whole reference: D = 17/28 = 0.607 > 0.522
    const far = ks.scan(Float64Array.from({ length: 28 }, (_, i) => (i < 11 ? i + 0.5 : 100)));
    expect(far).toBe(27);
    ks.restart();
    // the reference itself and 13 of 28 above it: D = 13/28 = 0.464 < 0.522
    const near = Array.from({ length: 28 }, (_, i) => ks.observe(i < 15 ? i : 100)).at(-1);
    expect(near?.statistic).toBeCloseTo(13 / 28, 15);
    expect(near?.status).not.toBe("change");
  });

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
