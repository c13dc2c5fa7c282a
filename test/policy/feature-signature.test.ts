import { describe, expect, it } from "vitest";
import { FeatureAttribution, signatureOf } from "@leeway/policy";
import { RandomSource } from "@leeway/core";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";
import { throughJson } from "../support/errors.js";

const LIMITS = { minSpread: 0.3, maxLocality: 0.5, minStrength: 4 };
const n = 32;
const quiet = new Float64Array(n).fill(0.01);

describe("signatureOf", () => {
  it("an even shift over every feature is broadband with spread 1 and locality 1/4 (participation ratio, from memory)", () => {
    const sig = signatureOf(new Float64Array(n).fill(0.5), quiet, 100, LIMITS);
    expect(sig.spread).toBeCloseTo(1, 12);
    expect(sig.locality).toBeCloseTo(0.25, 12);
    expect(sig.rising).toBe(1);
    expect([sig.determined, sig.broadband]).toEqual([true, true]);
  });

  it("a shift in one feature has spread 1/n, locality 1, and names that feature first", () => {
    const shift = new Float64Array(n);
    shift[7] = 2;
    const sig = signatureOf(shift, quiet, 100, LIMITS);
    expect(sig.spread).toBeCloseTo(1 / n, 12);
    expect(sig.locality).toBe(1);
    expect(sig.top[0]).toEqual({ feature: 7, share: 1 });
    expect(sig.broadband).toBe(false);
  });

  it("lines at a few neighbouring features are local even when several carry energy", () => {
    const shift = new Float64Array(n);
    for (const j of [10, 11, 12, 14]) shift[j] = 1;
    const sig = signatureOf(shift, quiet, 100, LIMITS);
    expect(sig.locality).toBe(1);
    expect(sig.broadband).toBe(false);
  });

  it("a falling gain (every residual lower) is broadband with no rising share", () => {
    const sig = signatureOf(new Float64Array(n).fill(-0.3), quiet, 100, LIMITS);
    expect(sig.rising).toBe(0);
    expect(sig.broadband).toBe(true);
  });

  it("noise alone is not determined: the energy noise gives is subtracted (seeded, 200 draws)", () => {
    const rng = new RandomSource("signature-noise");
    let determined = 0;
    for (let k = 0; k < 200; k++) {
      const samples = 50;
      const shift = Float64Array.from({ length: n }, () => (rng.normal() * 0.1) / Math.sqrt(samples)); // mean of 50 draws of sd 0.1
      if (signatureOf(shift, quiet, samples, LIMITS).determined) determined++;
    }
    expect(determined).toBe(0);
  });

  it("fewer than 8 features never judge the shape", () => {
    const sig = signatureOf(new Float64Array(4).fill(1), new Float64Array(4).fill(0.01), 100, LIMITS);
    expect(sig.determined).toBe(false);
    expect(sig.broadband).toBe(false);
  });
});

describe("FeatureAttribution", () => {
  function calibrated(): FeatureAttribution {
    const a = new FeatureAttribution(50);
    const rng = new RandomSource("attribution");
    a.beginCalibration();
    for (let i = 0; i < 200; i++) {
      a.observe(Float64Array.from({ length: n }, () => 0.2 + 0.1 * rng.normal()), 0);
      a.calibrate();
    }
    a.finishCalibration(0);
    return a;
  }

  it("has no signature before a baseline or without residuals (score-only)", () => {
    const a = new FeatureAttribution(50);
    a.observe(undefined, 0);
    a.beginEpisode();
    expect(a.episode(0, LIMITS)).toBeNull();
    expect(a.present(0, LIMITS)).toBeNull();
  });

  it("an episode's mean shift is measured against the calibration mean: a local rise is named", () => {
    const a = calibrated();
    const x = new Float64Array(n).fill(0.2);
    x[3] = 1.5;
    a.observe(x, 0);
    a.beginEpisode();
    for (let i = 0; i < 9; i++) {
      a.observe(x, 0);
      a.extendEpisode();
    }
    const sig = a.episode(0, LIMITS);
    expect(a.episodeSamples).toBe(10);
    expect(sig?.top[0]?.feature).toBe(3);
    expect(sig?.broadband).toBe(false);
    expect(a.episode(1, LIMITS)).toBeNull(); // no baseline for reference 1
  });

  it("agreement: an episode on the degradation's features agrees (≈ 1), one on other features does not (≈ 0), and it survives a snapshot", () => {
    const a = calibrated();
    const rng = new RandomSource("agreement");
    const shifted = (features: number[], by: number): Float64Array => {
      const x = Float64Array.from({ length: n }, () => 0.2 + 0.1 * rng.normal());
      for (const j of features) x[j] = (x[j] as number) + by;
      return x;
    };
    const episodeOn = (b: FeatureAttribution, features: number[], by: number): number | null => {
      b.observe(shifted(features, by), 0);
      b.beginEpisode();
      for (let i = 0; i < 9; i++) {
        b.observe(shifted(features, by), 0);
        b.extendEpisode();
      }
      return b.agreement(0);
    };
    a.observe(shifted([4, 5, 6], 0.5), 0);
    a.beginEpisode();
    expect(a.agreement(0)).toBeNull(); // no degradation marked yet
    for (let i = 0; i < 200; i++) a.observe(shifted([4, 5, 6], 0.5), 0);
    a.markDegradation();
    const copy = FeatureAttribution.restore(throughJson(a.snapshot()), 50, 1);
    expect(episodeOn(a, [4, 5, 6], 1.5)).toBeGreaterThan(0.9);
    expect(episodeOn(copy, [20, 21, 22], 1.5)).toBeLessThan(0.3);
    a.restartPresent();
    expect(episodeOn(a, [4, 5, 6], 1.5)).toBeNull(); // a new reference forgets the degradation's direction
  });

  it("snapshot and restore continue bit for bit, and corrupted snapshots are refused", () => {
    const a = calibrated();
    a.observe(new Float64Array(n).fill(0.9), 0);
    a.beginEpisode();
    const b = FeatureAttribution.restore(JSON.parse(JSON.stringify(a.snapshot())), 50, 4);
    const x = new Float64Array(n).fill(0.7);
    for (const t of [a, b]) {
      t.observe(x, 0);
      t.extendEpisode();
    }
    expect(b.episode(0, LIMITS)).toEqual(a.episode(0, LIMITS));
    expect(b.present(0, LIMITS)).toEqual(a.present(0, LIMITS));
    expectRefusesCorruptions((s) => FeatureAttribution.restore(s, 50, 4), a.snapshot(), { sizePaths: [["features"]], variableLengthPaths: [["baselines"]], numRuns: 60 });
  });

  it("residuals too large to square safely are left out instead of overflowing the sums", () => {
    const a = new FeatureAttribution(50);
    a.beginCalibration();
    a.observe(new Float64Array(n).fill(1e200), 0);
    a.calibrate();
    expect(a.snapshot().state.calibrationCount).toBe(0);
  });
});

describe("documented examples", () => {
  it("FeatureAttribution's example", () => {
    const a = new FeatureAttribution(100);
    a.beginCalibration();
    for (let i = 0; i < 50; i++) {
      a.observe(Float64Array.from({ length: 16 }, (_, j) => Math.sin(i * 7 + j)), 0);
      a.calibrate();
    }
    a.finishCalibration(0);
    a.observe(new Float64Array(16).fill(3), 0);
    a.beginEpisode();
    expect(a.episode(0, { minSpread: 0.3, maxLocality: 0.5, minStrength: 4 })?.broadband).toBe(true);
  });

  it("signatureOf's example", () => {
    const even = signatureOf(new Float64Array(16).fill(1), new Float64Array(16).fill(0.01), 10, { minSpread: 0.3, maxLocality: 0.5, minStrength: 4 });
    expect([even.broadband, even.spread > 0.99]).toEqual([true, true]);
  });
});
