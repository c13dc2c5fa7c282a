import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { Cusum, PageHinkley } from "@leeway/change";
import { expectLeewayError } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";
import { expectRestoreContinues, expectScanEqualsObserve } from "./laws.js";

const samples = fc.array(fc.double({ min: -10, max: 10, noNaN: true }), { minLength: 1, maxLength: 80 });

describe("PageHinkley", () => {
  it("statistic equals the brute-force mₜ − min₀≤ₛ≤ₜ mₛ with the running mean x̄ₜ (both sides)", () => {
    fc.assert(
      fc.property(samples, fc.double({ min: 0, max: 1, noNaN: true }), (xs, delta) => {
        const test = new PageHinkley({ alarmLevel: 1e9, tolerance: delta, direction: "both", armAfter: 0 });
        xs.forEach((x, t) => {
          test.observe(x);
          let mUp = 0;
          let mDown = 0;
          let minUp = 0;
          let maxDown = 0;
          let sum = 0;
          for (let s = 0; s <= t; s++) {
            sum += xs[s] as number;
            const mean = sum / (s + 1);
            mUp += (xs[s] as number) - mean - delta;
            mDown += (xs[s] as number) - mean + delta;
            minUp = Math.min(minUp, mUp);
            maxDown = Math.max(maxDown, mDown);
          }
          expect(test.upper).toBeCloseTo(mUp - minUp, 9);
          expect(test.lower).toBeCloseTo(maxDown - mDown, 9);
        });
      }),
    );
  });

  it("with a known mean it equals the one-sided CUSUM with k = δ exactly, sample for sample", () => {
    fc.assert(
      fc.property(samples, fc.double({ min: -2, max: 2, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), (xs, mu, delta) => {
        const ph = new PageHinkley({ alarmLevel: 1e9, tolerance: delta, knownMean: mu, direction: "both", armAfter: 0 });
        const cusum = new Cusum({ mean: mu, sigma: 1, k: delta, h: 1e9 });
        for (const x of xs) {
          ph.observe(x);
          cusum.observe(x);
          expect(ph.upper).toBe(cusum.upper);
          expect(ph.lower).toBe(cusum.lower);
        }
      }),
    );
  });

  it("never alarms on constant input", () => {
    fc.assert(
      fc.property(fc.double({ min: -1e6, max: 1e6, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), (c, delta) => {
        const test = new PageHinkley({ alarmLevel: 1e-9, tolerance: delta, direction: "both", armAfter: 0 });
        expect(test.scan(new Float64Array(500).fill(c))).toBe(-1);
        expect(test.upper).toBe(0);
      }),
    );
  });

  it("on a noise-free step of size s > δ alarms exactly when the cumulative sum passes λ", () => {
    for (const [n0, s, delta, lambda] of [[100, 1, 0.1, 5], [40, 3, 0.5, 20], [10, 2, 0.2, 5]] as const) {
      const xs = Float64Array.from({ length: n0 + 2000 }, (_, i) => (i < n0 ? 0 : s));
      // expected: first t with Σ_{u ≤ t} (x_u − x̄_u − δ)⁺-recursion > λ, x̄_u = s·(u − n0 + 1)/(u + 1) after the step
      let g = 0;
      let expected = -1;
      for (let t = 0; t < xs.length; t++) {
        const mean = t < n0 ? 0 : (s * (t - n0 + 1)) / (t + 1);
        g = Math.max(0, g + (xs[t] as number) - mean - delta);
        if (g > lambda) {
          expected = t;
          break;
        }
      }
      expect(expected).toBeGreaterThan(n0);
      const test = new PageHinkley({ alarmLevel: lambda, tolerance: delta, armAfter: 0 });
      expect(test.scan(xs)).toBe(expected);
      const reading = new PageHinkley({ alarmLevel: lambda, tolerance: delta, armAfter: 0 });
      let first = -1;
      for (let t = 0; t < xs.length && first < 0; t++) if (reading.observe(xs[t] as number).status === "change") first = t;
      expect(first).toBe(expected);
    }
  });

  it("forgetting weights the running mean: Wₜ = αWₜ₋₁ + 1, x̄ₜ = x̄ₜ₋₁ + (xₜ − x̄ₜ₋₁)/Wₜ", () => {
    const test = new PageHinkley({ alarmLevel: 100, meanForgetting: 0.5 });
    test.observe(0);
    test.observe(3);
    // W = 1, 1.5 → x̄ = 0, 0 + 3/1.5 = 2
    expect(test.mean).toBeCloseTo(2, 14);
  });

  it("armAfter holds every alarm back", () => {
    const test = new PageHinkley({ alarmLevel: 0.1, knownMean: 0, armAfter: 5 });
    const statuses = [1, 1, 1, 1, 1].map((x) => test.observe(x).status);
    expect(statuses).toEqual(["warning", "warning", "warning", "warning", "change"]);
  });

  it("scan equals observe sample for sample (same changes, same state)", () => {
    expectScanEqualsObserve(() => new PageHinkley({ alarmLevel: 8, tolerance: 0.1, direction: "both", armAfter: 5 }));
    expectScanEqualsObserve(() => new PageHinkley({ alarmLevel: 4, meanForgetting: 0.9, direction: "down", nonFinite: "skip" }));
    expectScanEqualsObserve(() => new PageHinkley({ alarmLevel: 4, knownMean: 0.5, armAfter: 0 }));
  });

  it("snapshot mid-stream restores and continues identically", () => {
    const r = new RandomSource(9);
    const xs = Float64Array.from({ length: 500 }, (_, i) => r.normal() + (i > 300 ? 1 : 0));
    expectRestoreContinues(() => new PageHinkley({ alarmLevel: 10, tolerance: 0.2, direction: "both" }), PageHinkley.restore, xs);
    expectRestoreContinues(() => new PageHinkley({ alarmLevel: 10, meanForgetting: 0.99, knownMean: 0 }), PageHinkley.restore, xs);
  });

  it("refuses every bad option with E_OPTION naming it, and non-finite samples with E_NON_FINITE", () => {
    expectLeewayError(() => new PageHinkley({} as { alarmLevel: number }), "E_OPTION", "alarmLevel");
    expectLeewayError(() => new PageHinkley({ alarmLevel: 0 }), "E_OPTION", "alarmLevel", "0");
    expectLeewayError(() => new PageHinkley({ alarmLevel: 1, tolerance: -1 }), "E_OPTION", "tolerance");
    expectLeewayError(() => new PageHinkley({ alarmLevel: 1, meanForgetting: 0 }), "E_OPTION", "meanForgetting");
    expectLeewayError(() => new PageHinkley({ alarmLevel: 1, meanForgetting: 1.5 }), "E_OPTION", "meanForgetting");
    expectLeewayError(() => new PageHinkley({ alarmLevel: 1, knownMean: Infinity }), "E_OPTION", "knownMean");
    expectLeewayError(() => new PageHinkley({ alarmLevel: 1, armAfter: 1.5 }), "E_OPTION", "armAfter");
    expectLeewayError(() => new PageHinkley({ alarmLevel: 1, direction: "left" as "up" }), "E_OPTION", "direction");
    expectLeewayError(() => new PageHinkley({ alarmLevel: 1, warningFraction: 2 }), "E_OPTION", "warningFraction");
    expectLeewayError(() => new PageHinkley({ alarmLevel: 1, lambda: 2 } as { alarmLevel: number }), "E_OPTION", "lambda");
    expectLeewayError(() => new PageHinkley({ alarmLevel: 1 }).observe(-Infinity), "E_NON_FINITE", "x");
    const skip = new PageHinkley({ alarmLevel: 1, nonFinite: "skip" });
    expect(skip.scan(new Float64Array([Number.NaN, 1, Number.NaN]))).toBe(-1);
    expect([skip.count, skip.skipped]).toEqual([1, 2]);
  });

  it("refuses corrupted snapshots", () => {
    const test = new PageHinkley({ alarmLevel: 50, meanForgetting: 0.95, direction: "both" });
    test.scan(Float64Array.from({ length: 40 }, (_, i) => Math.sin(i)));
    expectRefusesCorruptions(PageHinkley.restore, test.snapshot());
    const known = new PageHinkley({ alarmLevel: 50, knownMean: 0 });
    known.scan(Float64Array.from({ length: 40 }, (_, i) => Math.cos(i)));
    expectRefusesCorruptions(PageHinkley.restore, known.snapshot());
  });
});
