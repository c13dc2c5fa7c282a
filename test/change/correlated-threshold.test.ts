import { describe, expect, it } from "vitest";
import { batchMeansSpread, batchMeansSpreadUpper, correlatedCusumThreshold, cusumArl, Cusum, gaussianThreshold, PageHinkley } from "@leeway/change";
import { RandomSource } from "@leeway/core";
import { calibratedThreshold, makeChangeTest } from "../../packages/policy/src/change-factory.js";

function ar1(n: number, rho: number, seed: number): Float64Array {
  const r = new RandomSource(seed);
  const out = new Float64Array(n);
  let e = 0;
  for (let i = 0; i < n; i++) {
    e = rho * e + Math.sqrt(1 - rho * rho) * r.normal();
    out[i] = e;
  }
  return out;
}

describe("change test factory and calibration", () => {
  it("makes a two-sided CUSUM (k = 0.5) or Page-Hinkley on normalised scores", () => {
    expect(makeChangeTest("cusum", 7)).toBeInstanceOf(Cusum);
    expect(makeChangeTest("page-hinkley", 7)).toBeInstanceOf(PageHinkley);
    expect(makeChangeTest("cusum", 7).threshold).toBe(7);
  });

  it("gaussianThreshold inverts the two-sided Siegmund ARL", () => {
    for (const target of [500, 20000]) expect(cusumArl(0.5, gaussianThreshold(target), 0, { sides: 2 })).toBeCloseTo(target, -1);
  });

  it("batch means: ν ≈ √((1 + ρ)/(1 − ρ)) for AR(1) (from memory), the upper bound above it", () => {
    const xs = ar1(40000, 0.5, 1);
    expect(batchMeansSpread(xs, 50)).toBeGreaterThan(0.9 * Math.sqrt(3));
    expect(batchMeansSpread(xs, 50)).toBeLessThan(1.1 * Math.sqrt(3));
    expect(batchMeansSpreadUpper(xs, 50)).toBeGreaterThan(batchMeansSpread(xs, 50));
    expect(batchMeansSpread(Float64Array.of(1, 2, 3), 2)).toBe(1);
  });

  it("the calibrated threshold is never below the white-noise one and grows with correlation", () => {
    const white = calibratedThreshold("cusum", ar1(600, 0, 2), 20000, 60, "a");
    const correlated = calibratedThreshold("cusum", ar1(600, 0.5, 2), 20000, 60, "a");
    expect(white).toBeGreaterThanOrEqual(gaussianThreshold(20000));
    expect(correlated).toBeGreaterThan(white);
  });

  it("a calibrated CUSUM on a correlated stream runs at least the target in control (simulated, 40 runs)", () => {
    const cal = ar1(600, 0.3, 5);
    const h = calibratedThreshold("cusum", cal, 2000, 100, "b");
    const fresh = ar1(400000, 0.3, 6);
    const test = new Cusum({ k: 0.5, h, mean: 0, sigma: 1 });
    let runs = 0;
    let from = 0;
    let total = 0;
    while (runs < 40 && from < fresh.length) {
      const at = test.scan(fresh, from);
      if (at < 0) {
        total += fresh.length - from;
        break;
      }
      total += at - from + 1;
      from = at + 1;
      runs++;
      test.restart();
    }
    // the mean of 40 exponential-like run lengths is within ±35 % of the true ARL with high probability
    expect(total / Math.max(1, runs)).toBeGreaterThan(0.65 * 2000);
  });
});

describe("correlatedCusumThreshold", () => {
  it("its doc example: a correlated stream never gets a threshold below the white-noise one", () => {
    const z = Float64Array.from({ length: 600 }, (_, i) => Math.sin(i * 1.3) + Math.sin(i * 0.7));
    const h = correlatedCusumThreshold((t) => new Cusum({ k: 0.5, h: t, mean: 0, sigma: 1, direction: "both" }), z, { targetArl0: 20000, replicates: 20, seed: 1, k: 0.5 });
    expect(h).toBeGreaterThanOrEqual(gaussianThreshold(20000));
  });
});
