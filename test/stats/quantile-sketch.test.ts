import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { QuantileSketch } from "@leeway/stats";
import { expectLeewayError, throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";

const DELTA = 1e-6; // per-query failure probability of the stated bound; the union over every query here stays far below 1

/** Exact fraction of `sorted` ≤ v and < v. */
function trueRanks(sorted: Float64Array, v: number): { atMost: number; below: number } {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if ((sorted[mid] as number) <= v) lo = mid + 1;
    else hi = mid;
  }
  let b = 0;
  let e = sorted.length;
  while (b < e) {
    const mid = (b + e) >>> 1;
    if ((sorted[mid] as number) < v) b = mid + 1;
    else e = mid;
  }
  return { atMost: lo / sorted.length, below: b / sorted.length };
}

function expectWithinBound(s: QuantileSketch, xs: Float64Array): void {
  const sorted = xs.slice().sort();
  const eps = s.rankErrorBound(DELTA);
  for (let i = 0; i <= 50; i++) {
    const v = sorted[Math.floor((i / 50) * (sorted.length - 1))] as number;
    expect(Math.abs(s.rank(v) - trueRanks(sorted, v).atMost)).toBeLessThanOrEqual(eps + 1e-12);
    const q = i / 50;
    const est = s.quantile(q);
    const t = trueRanks(sorted, est);
    expect(t.below).toBeLessThanOrEqual(q + eps + 1e-12);
    expect(t.atMost).toBeGreaterThanOrEqual(q - eps - 1e-12);
  }
}

const streams: [string, (r: RandomSource, n: number) => Float64Array][] = [
  ["uniform", (r, n) => r.fillUniform(new Float64Array(n))],
  ["log-normal scores", (r, n) => Float64Array.from({ length: n }, () => 0.07 * Math.exp(0.3 * r.normal()))],
  ["sorted", (_r, n) => Float64Array.from({ length: n }, (_, i) => i)],
  ["reversed", (_r, n) => Float64Array.from({ length: n }, (_, i) => n - i)],
  ["heavy ties", (r, n) => Float64Array.from({ length: n }, () => r.integer(7))],
];

describe("QuantileSketch", () => {
  it("quantile and rank estimates lie within the stated rank-error bound (δ = 1e-6) on varied streams", () => {
    for (const [, make] of streams) {
      for (const n of [150, 5_000, 60_000]) {
        const xs = make(new RandomSource(`sketch-${n}`), n);
        const s = new QuantileSketch({ k: 64, seed: n });
        s.observeMany(xs);
        expectWithinBound(s, xs);
        expect(s.min).toBe(Math.min(...xs));
        expect(s.max).toBe(Math.max(...xs));
      }
    }
  });

  it("is exact while nothing has been compacted, and the bound is then 0", () => {
    const s = new QuantileSketch({ k: 200, seed: 3 });
    s.observeMany(Float64Array.from([5, 1, 4, 2, 3]));
    expect(s.rankErrorBound()).toBe(0);
    expect(s.rank(3)).toBe(0.6);
    expect(s.quantile(0.5)).toBe(3);
    expect(s.quantile(0)).toBe(1);
    expect(s.quantile(1)).toBe(5);
  });

  it("the bound shrinks as k grows (≈ 1/k), and memory stays near 3k", () => {
    const xs = new RandomSource("k").fillUniform(new Float64Array(100_000));
    const small = new QuantileSketch({ k: 50, seed: 1 });
    small.observeMany(xs);
    const large = new QuantileSketch({ k: 400, seed: 1 });
    large.observeMany(xs);
    expect(large.rankErrorBound()).toBeLessThan(small.rankErrorBound() / 4);
    expect(small.retained).toBeLessThan(3 * 50 + 8 * 20);
    expect(large.retained).toBeLessThan(3 * 400 + 8 * 20);
  });

  it("merge of two halves equals one pass: same count, min, max and error budget, estimates within the bound", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 20_000 }), fc.double({ min: 0, max: 1, noNaN: true }), fc.integer(), (n, f, seed) => {
        const xs = new RandomSource(seed).fillUniform(new Float64Array(n));
        const cut = Math.floor(f * n);
        const left = new QuantileSketch({ k: 32, seed: `${seed}-left` });
        left.observeMany(xs.subarray(0, cut));
        const right = new QuantileSketch({ k: 32, seed: `${seed}-right` });
        right.observeMany(xs.subarray(cut));
        const before = right.snapshot();
        left.merge(right);
        expect(right.snapshot()).toEqual(before);
        expect(left.count).toBe(n);
        expect(left.min).toBe(Math.min(...xs));
        expect(left.max).toBe(Math.max(...xs));
        expectWithinBound(left, xs);
        // Still a valid sketch: it restores, which checks Σ size·2^h = count and sorted levels.
        expect(() => QuantileSketch.restore(throughJson(left.snapshot()))).not.toThrow();
      }),
      { numRuns: 25 },
    );
  });

  it("observeMany reaches the same state as observe on each element, coin flips included, and snapshot/restore continues bit-identically", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -1e3, max: 1e3, noNaN: true }), { maxLength: 3000 }), fc.integer({ min: 0, max: 3000 }), fc.integer(), (values, cut, seed) => {
        const xs = Float64Array.from(values);
        const a = new QuantileSketch({ k: 16, seed });
        for (const x of xs) a.observe(x);
        const b = new QuantileSketch({ k: 16, seed });
        b.observeMany(xs.subarray(0, Math.min(cut, xs.length)));
        b.observeMany(xs.subarray(Math.min(cut, xs.length)));
        expect(b.snapshot()).toEqual(a.snapshot());
        const c = QuantileSketch.restore(throughJson(a.snapshot()));
        const more = new RandomSource(seed).fillUniform(new Float64Array(500));
        a.observeMany(more);
        c.observeMany(more);
        expect(c.snapshot()).toEqual(a.snapshot());
        expect(c.quantile(0.3)).toBe(a.quantile(0.3));
      }),
      { numRuns: 40 },
    );
  });

  it("the same seed repeats exactly; another seed flips other coins", () => {
    const xs = new RandomSource("seeds").fillUniform(new Float64Array(20_000));
    const a = new QuantileSketch({ seed: "a" });
    const a2 = new QuantileSketch({ seed: "a" });
    const b = new QuantileSketch({ seed: "b" });
    for (const s of [a, a2, b]) s.observeMany(xs);
    expect(a2.snapshot()).toEqual(a.snapshot());
    expect(b.snapshot().state.levels).not.toEqual(a.snapshot().state.levels);
  });

  it("refuses non-finite samples by default, and skips and counts them under nonFinite: skip", () => {
    const s = new QuantileSketch({ seed: 1 });
    expect(s.quantile(0.5)).toBeNaN();
    expect(s.rank(1)).toBeNaN();
    expectLeewayError(() => s.observe(Number.NaN), "E_NON_FINITE", "x", "NaN");
    expectLeewayError(() => s.observeMany(Float64Array.from([1, 2, -Infinity])), "E_NON_FINITE", "-Infinity");
    expect(s.count).toBe(2);
    const skip = new QuantileSketch({ seed: 1, nonFinite: "skip" });
    skip.observeMany(Float64Array.from([1, Infinity, 2]));
    expect(skip.observe(Number.NaN)).toEqual({ count: 2, retained: 2, skipped: 2 });
  });

  it("rejects each bad option and argument with its error and code", () => {
    expectLeewayError(() => new QuantileSketch({} as never), "E_OPTION", "seed", "undefined");
    expectLeewayError(() => new QuantileSketch({ seed: "" }), "E_OPTION", "seed");
    expectLeewayError(() => new QuantileSketch({ seed: 1, k: 4 }), "E_OPTION", "k", "[8, 65536]");
    expectLeewayError(() => new QuantileSketch({ seed: 1, k: 100.5 }), "E_OPTION", "k", "100.5");
    expectLeewayError(() => new QuantileSketch({ seed: 1, nonFinite: "x" as never }), "E_OPTION", "nonFinite");
    expectLeewayError(() => new QuantileSketch({ seed: 1, eps: 0.01 } as never), "E_OPTION", "eps");
    const s = new QuantileSketch({ seed: 1 });
    s.observe(1);
    expectLeewayError(() => s.quantile(1.5), "E_OPTION", "q", "1.5");
    expectLeewayError(() => s.rank(Number.NaN), "E_OPTION", "x");
    expectLeewayError(() => s.rankErrorBound(0), "E_OPTION", "delta");
    expectLeewayError(() => s.merge(new QuantileSketch({ seed: 2, k: 100 })), "E_STATE", "k = 200", "k = 100");
    expectLeewayError(() => s.merge(s), "E_STATE", "itself");
  });

  it("refuses every corrupted snapshot", () => {
    const s = new QuantileSketch({ k: 8, seed: 5 });
    s.observeMany(new RandomSource("c").fillUniform(new Float64Array(200)));
    const snap = s.snapshot();
    // Level lengths are cross-checked against the count (Σ size·2^h = count), so every length mutation must be refused too.
    expectRefusesCorruptions((x) => QuantileSketch.restore(x), snap);
    expectRefusesCorruptions((x) => QuantileSketch.restore(x), new QuantileSketch({ seed: 1 }).snapshot());
    const heavy = throughJson(snap);
    heavy.state.levels[0]?.items.push(0.5);
    expectLeewayError(() => QuantileSketch.restore(heavy), "E_SNAPSHOT", "total weight");
    const unsorted = throughJson(snap);
    const top = unsorted.state.levels[unsorted.state.levels.length - 1]?.items ?? [];
    top.reverse();
    expectLeewayError(() => QuantileSketch.restore(unsorted), "E_SNAPSHOT", "sorted");
    const outside = throughJson(snap);
    outside.state.min = 0.9;
    expectLeewayError(() => QuantileSketch.restore(outside), "E_SNAPSHOT", "within");
  });
});
