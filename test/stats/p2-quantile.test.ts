import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { P2Quantile } from "@leeway/stats";
import { expectLeewayError, throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";

const sample = fc.double({ min: -1e4, max: 1e4, noNaN: true });
const stream = (maxLength: number) => fc.array(sample, { minLength: 1, maxLength }).map((a) => Float64Array.from(a));
const p = fc.double({ min: 0.01, max: 0.99, noNaN: true });

/** Fraction of `sorted` strictly below and at most `v`. */
function rankInterval(sorted: Float64Array, v: number): [number, number] {
  let below = 0;
  let atMost = 0;
  for (const x of sorted) {
    if (x < v) below++;
    if (x <= v) atMost++;
  }
  return [below / sorted.length, atMost / sorted.length];
}

describe("P2Quantile", () => {
  it("observeMany reaches the same state as observe on each element, and snapshot/restore continues bit-identically", () => {
    fc.assert(
      fc.property(stream(300), stream(100), p, (head, tail, q) => {
        const a = new P2Quantile({ p: q });
        for (const x of head) a.observe(x);
        const b = new P2Quantile({ p: q });
        b.observeMany(head);
        expect(b.snapshot()).toEqual(a.snapshot());
        const c = P2Quantile.restore(throughJson(a.snapshot()));
        for (const x of tail) expect(c.observe(x)).toEqual(a.observe(x));
        expect(c.snapshot()).toEqual(a.snapshot());
      }),
      { numRuns: 80 },
    );
  });

  it("markers stay ordered: positions strictly increasing from 1 to the count, heights non-decreasing from the min to the max", () => {
    fc.assert(
      fc.property(stream(400), p, (xs, q) => {
        fc.pre(xs.length >= 5);
        const e = new P2Quantile({ p: q });
        e.observeMany(xs);
        const n = e.positions();
        const h = e.heights();
        expect(n[0]).toBe(1);
        expect(n[4]).toBe(xs.length);
        for (let i = 1; i < 5; i++) {
          expect(n[i]).toBeGreaterThan(n[i - 1] as number);
          expect(h[i]).toBeGreaterThanOrEqual(h[i - 1] as number);
        }
        expect(h[0]).toBe(Math.min(...xs) + 0);
        expect(h[4]).toBe(Math.max(...xs) + 0);
      }),
      { numRuns: 80 },
    );
  });

  it("the estimate lies within 0.02 of rank of p on 20 000 samples from smooth distributions", () => {
    const r = new RandomSource("p2-rank");
    for (const q of [0.05, 0.5, 0.9, 0.99]) {
      for (const draw of [() => r.normal(), () => r.exponential(2), () => 0.07 * Math.exp(0.3 * r.normal())]) {
        const xs = new Float64Array(20_000);
        for (let i = 0; i < xs.length; i++) xs[i] = draw();
        const e = new P2Quantile({ p: q });
        e.observeMany(xs);
        const [lo, hi] = rankInterval(xs.slice().sort(), e.estimate);
        expect(lo).toBeLessThanOrEqual(q + 0.02);
        expect(hi).toBeGreaterThanOrEqual(q - 0.02);
      }
    }
  });

  it("before five samples the estimate is the interpolated sample quantile of the samples so far", () => {
    const e = new P2Quantile({ p: 0.5 });
    expect(e.estimate).toBeNaN();
    e.observe(3);
    expect(e.estimate).toBe(3);
    e.observe(1);
    expect(e.estimate).toBe(2);
    e.observe(10);
    expect(e.estimate).toBe(3);
    const hi = new P2Quantile({ p: 0.75 });
    hi.observeMany(Float64Array.from([4, 0, 8, 2]));
    expect(hi.estimate).toBe(5); // (n − 1)p = 2.25 → 4 + 0.25·(8 − 4)
  });

  it("refuses non-finite samples by default, and skips and counts them under nonFinite: skip", () => {
    const e = new P2Quantile({ p: 0.5 });
    expectLeewayError(() => e.observe(Infinity), "E_NON_FINITE", "x", "Infinity");
    expectLeewayError(() => e.observeMany(Float64Array.from([1, Number.NaN])), "E_NON_FINITE", "NaN");
    expect(e.count).toBe(1);
    const skip = new P2Quantile({ p: 0.5, nonFinite: "skip" });
    skip.observeMany(Float64Array.from([1, Number.NaN, 2, 3, 4, 5, 6]));
    expect(skip.observe(-Infinity)).toMatchObject({ count: 6, skipped: 2 });
  });

  it("samples beyond |x| = 1e100 are refused with E_SAMPLE under either policy, in both paths, and the state is kept", () => {
    const a = new P2Quantile({ p: 0.5 });
    expectLeewayError(() => a.observe(-1e101), "E_SAMPLE", "x", "1e+100", "-1e+101");
    expectLeewayError(() => a.observeMany(Float64Array.from([1, 1e200])), "E_SAMPLE", "1e+200");
    expect(a.count).toBe(1);
    const skip = new P2Quantile({ ...{ p: 0.5 }, nonFinite: "skip" });
    expectLeewayError(() => skip.observeMany(Float64Array.from([1, 1e300, 3])), "E_SAMPLE", "1e+300");
    expect(skip.skipped).toBe(0);
    expect(skip.count).toBe(1);
  });

  it("refuses non-numbers with E_SAMPLE naming x and the type, under skip too; a batch must be a Float64Array", () => {
    const skip = new P2Quantile({ ...{ p: 0.5 }, nonFinite: "skip" });
    expectLeewayError(() => skip.observe(null as never), "E_SAMPLE", "x", "null");
    expectLeewayError(() => skip.observe("5" as never), "E_SAMPLE", "x", "string");
    expectLeewayError(() => skip.observe([7] as never), "E_SAMPLE", "x", "array");
    expectLeewayError(() => skip.observe({} as never), "E_SAMPLE", "x", "object");
    expectLeewayError(() => skip.observeMany([1, 2] as never), "E_SAMPLE", "xs", "array");
    expect(skip.count).toBe(0);
    expect(skip.skipped).toBe(0);
  });

  it("rejects each bad option with E_OPTION naming it", () => {
    expectLeewayError(() => new P2Quantile({ p: 0 }), "E_OPTION", "p", "(0, 1)");
    expectLeewayError(() => new P2Quantile({ p: 1 }), "E_OPTION", "p", "1");
    expectLeewayError(() => new P2Quantile({ p: Number.NaN }), "E_OPTION", "p", "NaN");
    expectLeewayError(() => new P2Quantile({} as never), "E_OPTION", "p", "undefined");
    expectLeewayError(() => new P2Quantile({ p: 0.5, nonFinite: "no" as never }), "E_OPTION", "nonFinite");
    expectLeewayError(() => new P2Quantile({ p: 0.5, quantile: 0.5 } as never), "E_OPTION", "quantile");
  });

  it("refuses every corrupted snapshot", () => {
    const e = new P2Quantile({ p: 0.9 });
    e.observeMany(Float64Array.from({ length: 50 }, (_, i) => Math.sin(i)));
    expectRefusesCorruptions((s) => P2Quantile.restore(s), e.snapshot());
    const early = new P2Quantile({ p: 0.9 });
    early.observeMany(Float64Array.from([1, 2]));
    expectRefusesCorruptions((s) => P2Quantile.restore(s), early.snapshot());
    const disordered = throughJson(e.snapshot());
    disordered.state.positions = [1, 3, 2, 40, 50];
    expectLeewayError(() => P2Quantile.restore(disordered), "E_SNAPSHOT", "positions");
    const heights = throughJson(e.snapshot());
    heights.state.heights[2] = 100;
    expectLeewayError(() => P2Quantile.restore(heights), "E_SNAPSHOT", "heights");
  });
});
