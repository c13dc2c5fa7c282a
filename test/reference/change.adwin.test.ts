import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { Adwin } from "@leeway/change";

// ε_cut of the variance bound, δ′ = δ/n (Bifet & Gavaldà 2007, §3 and §4; from memory)
function epsCut(n0: number, n1: number, variance: number, delta: number): number {
  const invM = 1 / n0 + 1 / n1;
  const log = Math.log((2 * (n0 + n1)) / delta);
  return Math.sqrt(2 * invM * variance * log) + (2 / 3) * invM * log;
}

function countCuts(adwin: Adwin, xs: Float64Array): number {
  let cuts = 0;
  for (let from = 0; ; ) {
    const hit = adwin.scan(xs, from);
    if (hit < 0) return cuts;
    cuts++;
    from = hit + 1;
  }
}

describe("ADWIN against the guarantees of Bifet & Gavaldà (2007), Theorem 3.1 (from memory)", () => {
  const delta = 0.05; // a large δ, so that the bound allows about 150 false cuts in these checks
  const n = 100_000;
  const checkPeriod = 32;

  it("false cuts on stationary Bernoulli(0.3) streams: no more often than δ per check", () => {
    let cuts = 0;
    for (let seed = 0; seed < 3; seed++) {
      const r = new RandomSource(`bernoulli/${seed}`);
      const xs = Float64Array.from({ length: n }, () => (r.next() < 0.3 ? 1 : 0));
      cuts += countCuts(new Adwin({ delta, checkPeriod }), xs);
    }
    const checks = (3 * n) / checkPeriod;
    expect(cuts / checks).toBeLessThanOrEqual(delta);
  });

  it("false cuts on stationary Gaussian streams: no more often than δ per check (variance and Hoeffding bounds)", () => {
    let cuts = 0;
    for (let seed = 0; seed < 3; seed++) {
      const r = new RandomSource(`gauss/${seed}`);
      const xs = Float64Array.from({ length: n }, () => r.normal(5, 2));
      cuts += countCuts(new Adwin({ delta, checkPeriod }), xs);
      cuts += countCuts(new Adwin({ delta, checkPeriod, bound: "hoeffding" }), xs.map((x) => Math.min(1, Math.max(0, x / 10))));
    }
    const checks = (6 * n) / checkPeriod;
    expect(cuts / checks).toBeLessThanOrEqual(delta);
  });

  for (const shift of [0.5, 1, 2]) {
    it(`an abrupt shift of ${shift}σ is detected within the n₁ at which |μ₀ − μ₁| > 2ε_cut, and the window shrinks to the post-change part`, () => {
      const d = 0.002;
      const n0 = 2000;
      const post = 4000;
      // n₁*: the first n₁ with shift > 2·ε_cut(n₀, n₁), σ²_W the variance of the mixed window
      let n1Star = 1;
      while (shift <= 2 * epsCut(n0, n1Star, 1 + (shift * shift * n0 * n1Star) / (n0 + n1Star) ** 2, d)) n1Star++;
      // r*: the fewest pre-change samples beside `post` new ones whose difference the theorem guarantees to cut
      let rStar = 1;
      while (shift <= 2 * epsCut(rStar, post, 1 + (shift * shift * rStar * post) / (rStar + post) ** 2, d)) rStar++;
      for (let seed = 0; seed < 10; seed++) {
        const r = new RandomSource(`shift/${shift}/${seed}`);
        const xs = Float64Array.from({ length: n0 + post }, (_, i) => r.normal() + (i >= n0 ? shift : 0));
        const adwin = new Adwin({ delta: d, checkPeriod: 32 });
        const hit = adwin.scan(xs);
        expect(hit).toBeGreaterThanOrEqual(n0);
        expect(hit - n0 + 1).toBeLessThanOrEqual(n1Star + 32);
        for (let from = hit + 1; from < xs.length; ) {
          const next = adwin.scan(xs, from);
          if (next < 0) break;
          from = next + 1;
        }
        expect(adwin.width - post).toBeLessThan(rStar);
        expect(Math.abs(adwin.mean - shift)).toBeLessThan(0.1 + shift / 4);
      }
    });
  }
});
