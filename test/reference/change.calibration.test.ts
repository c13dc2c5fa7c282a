import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { calibrateThreshold, Cusum } from "@leeway/change";
import { normalCdf } from "@leeway/stats";

// Score distributions: inverse distribution functions and samplers of the same law.
function normalQuantile(p: number): number {
  // Newton's method on Φ (normalCdf is accurate to ~1e-14)
  let x = 0;
  for (let it = 0; it < 60; it++) {
    const step = (normalCdf(x) - p) / (Math.exp((-x * x) / 2) / Math.sqrt(2 * Math.PI));
    x -= Math.max(-2, Math.min(2, step));
    if (Math.abs(step) < 1e-13) break;
  }
  return x;
}
const laws = {
  gaussian: { quantile: (u: number) => normalQuantile(u), draw: (r: RandomSource) => r.normal() },
  exponential: { quantile: (u: number) => -Math.log(1 - u), draw: (r: RandomSource) => r.exponential() },
  lognormal: { quantile: (u: number) => Math.exp(0.5 * normalQuantile(u)), draw: (r: RandomSource) => Math.exp(0.5 * r.normal()) },
};

/**
 * A stratified reference sample xᵢ = F⁻¹((i + Uᵢ)/n): a sample of the law whose empirical distribution
 * is much closer to F than an i.i.d. one, so that the check measures the calibration, not the luck of
 * the reference (common practice, no source).
 */
function stratifiedReference(quantile: (u: number) => number, n: number, seed: string): Float64Array {
  const r = new RandomSource(seed);
  return Float64Array.from({ length: n }, (_, i) => quantile((i + r.next()) / n));
}

/** Mean run length of `runs` consecutive runs on one fresh i.i.d. stream (restart after each alarm). */
function freshArl(test: Cusum, draw: (r: RandomSource) => number, runs: number, seed: string): number {
  const r = new RandomSource(seed);
  const buffer = new Float64Array(1 << 15);
  const refill = (): void => {
    for (let i = 0; i < buffer.length; i++) buffer[i] = draw(r);
  };
  refill();
  let offset = 0;
  let runStart = 0;
  let total = 0;
  let done = 0;
  let from = 0;
  while (done < runs) {
    const hit = test.scan(buffer, from);
    if (hit < 0) {
      offset += buffer.length;
      refill();
      from = 0;
      continue;
    }
    total += offset + hit + 1 - runStart;
    runStart = offset + hit + 1;
    done++;
    test.restart();
    from = hit + 1;
  }
  return total / runs;
}

// Tolerance ±15 %: the search's estimate has a relative error of about 1/√1000 = 3.2 % and the check's
// about 1/√2000 = 2.2 % (in-control run lengths are close to geometric: sd ≈ mean), so 15 % is over
// 3.5 standard errors of their combination.
describe("calibrateThreshold: empirical ARL0 on fresh i.i.d. streams (Monte Carlo; common practice, no source)", () => {
  for (const [name, law] of Object.entries(laws)) {
    for (const target of [500, 5000]) {
      it(`${name} scores, target ARL0 ${target}: within ±15 %`, () => {
        const reference = stratifiedReference(law.quantile, 20_000, `reference/${name}`);
        let mean = 0;
        for (const x of reference) mean += x / reference.length;
        let m2 = 0;
        for (const x of reference) m2 += (x - mean) ** 2;
        const sigma = Math.sqrt(m2 / (reference.length - 1));
        const make = (h: number): Cusum => new Cusum({ mean, sigma, k: 0.5, h, direction: "up" });
        const result = calibrateThreshold(make, reference, { targetArl0: target, seed: `calibrate/${name}/${target}`, replicates: 1000, blockLength: 1 });
        expect(result.interval[0]).toBeLessThan(result.interval[1]);
        const empirical = freshArl(make(result.threshold), law.draw, 2000, `fresh/${name}/${target}`);
        expect(Math.abs(empirical / target - 1)).toBeLessThan(0.15);
      });
    }
  }
});
