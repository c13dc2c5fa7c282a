import { describe, expect, it } from "vitest";
import {
  mannKendallHamedRao,
  mannKendallPrewhitened,
  erfc,
  EwMoments,
  kolmogorovSurvival,
  ksTwoSample,
  mannKendall,
  Moments,
  normalSurvival,
  P2Quantile,
  QuantileSketch,
  theilSenSlope,
  WindowMoments,
  WindowTrend,
} from "@leeway/stats";

// Each block repeats an @example of the package's doc comments and checks the result it prints.
describe("the @example of every export", () => {
  it("Moments", () => {
    const m = new Moments();
    m.observeMany(Float64Array.from([2, 4, 4, 4, 5, 5, 7, 9]));
    expect([m.mean, m.std, m.sampleVariance.toFixed(4)]).toEqual([5, 2, "4.5714"]);
  });

  it("EwMoments", () => {
    const ew = new EwMoments({ halfLife: 1 });
    ew.observe(1);
    expect(ew.observe(4).mean).toBe(3);
  });

  it("WindowMoments", () => {
    const w = new WindowMoments({ width: 3 });
    w.observeMany(Float64Array.from([9, 1, 2, 3]));
    expect([w.mean, w.min, w.max, w.size]).toEqual([2, 1, 3, 3]);
  });

  it("P2Quantile", () => {
    const q = new P2Quantile({ p: 0.5 });
    q.observeMany(Float64Array.from([0.02, 0.15, 0.74, 3.39, 0.83, 22.37, 10.15, 15.43, 38.62, 15.92]));
    expect(q.estimate.toFixed(2)).toBe("4.75");
  });

  it("QuantileSketch", () => {
    const s = new QuantileSketch({ k: 200, seed: 7 });
    s.observeMany(Float64Array.from({ length: 1000 }, (_, i) => i / 1000));
    expect([s.quantile(0.5), s.rank(0.25), s.retained]).toEqual([0.499, 0.252, 322]);
  });

  it("WindowTrend", () => {
    const t = new WindowTrend({ width: 14 });
    t.observeMany(Float64Array.from([12.9, 14.8, 13.2, 15.7, 13.8, 15.6, 12.9, 11.0, 17.3, 15.9, 19.0, 18.3, 20.1, 21.7]));
    expect([t.s, t.variance.toFixed(3), t.z.toFixed(4)]).toEqual([54, "332.667", "2.9058"]);
  });

  it("mannKendall, theilSenSlope", () => {
    expect(mannKendall([1, 2, 3, 4, 5]).s).toBe(10);
    expect(theilSenSlope([1, 3, 5, 100, 9])).toBe(2);
  });

  it("ksTwoSample, kolmogorovSurvival", () => {
    const r = ksTwoSample([0.1, 0.2, 0.3, 0.4], [0.35, 0.5, 0.6, 0.7]);
    expect([r.d, r.pValue.toFixed(3)]).toEqual([0.75, "0.211"]);
    expect(kolmogorovSurvival(1.3581).toFixed(3)).toBe("0.050");
  });

  it("erfc, normalSurvival", () => {
    expect(erfc(0)).toBe(1);
    expect(normalSurvival(1.959963984540054).toFixed(4)).toBe("0.0250");
  });

  it("mannKendallHamedRao", () => {
    const r = mannKendallHamedRao([3, 1, 4, 1, 5, 9, 2, 6, 5, 3, 5, 8]);
    expect([r.s, r.lagsUsed]).toEqual([25, []]);
  });

  it("mannKendallPrewhitened", () => {
    const r = mannKendallPrewhitened([1.0, 1.2, 0.9, 1.4, 1.6, 1.3, 1.9, 2.1, 1.8, 2.4]);
    expect([r.n, r.s > 0, r.phi > 0]).toEqual([10, true, true]);
  });
});
