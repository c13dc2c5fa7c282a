import fc from "fast-check";
import { gammaln } from "simple-statistics";
import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { ChangePointPosterior, type ChangePointReading } from "@leeway/change";
import { expectLeewayError, throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";

interface Prior {
  mu0: number;
  kappa0: number;
  alpha0: number;
  beta0: number;
}

/** ln p(segment) under the Normal-Gamma prior, in closed form (Murphy 2007, "Conjugate Bayesian analysis of the Gaussian distribution", eq. 95). */
function logEvidence(ys: number[], p: Prior): number {
  const n = ys.length;
  const mean = ys.reduce((a, b) => a + b, 0) / n;
  const ss = ys.reduce((a, y) => a + (y - mean) ** 2, 0);
  const kn = p.kappa0 + n;
  const an = p.alpha0 + n / 2;
  const bn = p.beta0 + ss / 2 + (p.kappa0 * n * (mean - p.mu0) ** 2) / (2 * kn);
  return gammaln(an) - gammaln(p.alpha0) + p.alpha0 * Math.log(p.beta0) - an * Math.log(bn) + 0.5 * Math.log(p.kappa0 / kn) - (n / 2) * Math.log(2 * Math.PI);
}

/** P(current segment length = ℓ | y₁…y_T) by summing over all 2^{T−1} segmentations (a new segment before each sample after the first with probability H). */
function brutePosterior(ys: number[], p: Prior, hazard: number): number[] {
  const T = ys.length;
  const mass = new Array<number>(T + 1).fill(0);
  const logs: { len: number; log: number }[] = [];
  for (let mask = 0; mask < 1 << (T - 1); mask++) {
    // bit t−1 set: a new segment starts at sample t (1 ≤ t < T)
    let log = 0;
    let start = 0;
    for (let t = 1; t <= T; t++) {
      const boundary = t === T || ((mask >> (t - 1)) & 1) === 1;
      if (t < T) log += Math.log(boundary ? hazard : 1 - hazard);
      if (boundary) {
        log += logEvidence(ys.slice(start, t), p);
        if (t === T) logs.push({ len: T - start, log });
        start = t;
      }
    }
  }
  const top = Math.max(...logs.map((l) => l.log));
  let total = 0;
  for (const l of logs) {
    const w = Math.exp(l.log - top);
    mass[l.len]! += w;
    total += w;
  }
  return mass.map((m) => m / total);
}

describe("ChangePointPosterior", () => {
  it("the @example", () => {
    const post = new ChangePointPosterior({ scale: "linear", mean: 0, sigma: 1, expectedRunLength: 100 });
    const xs = Float64Array.from({ length: 80 }, (_, i) => (i < 50 ? 0 : 4) + 0.3 * Math.sin(i * 1.7));
    let last: ChangePointReading | undefined;
    for (const x of xs) last = post.observe(x);
    expect([last?.onset, last?.level?.toFixed(1)]).toEqual([50, "3.9"]);
  });

  it("without pruning, the run-length posterior equals a brute-force sum over all segmentations of short series (Adams & MacKay 2007, the recursion's definition, from memory)", () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -3, max: 3, noNaN: true }), { minLength: 1, maxLength: 10 }),
        fc.record({ mu0: fc.double({ min: -1, max: 1, noNaN: true }), kappa0: fc.double({ min: 0.1, max: 5, noNaN: true }), alpha0: fc.double({ min: 0.5, max: 4, noNaN: true }), sigma0: fc.double({ min: 0.3, max: 3, noNaN: true }) }),
        fc.double({ min: 1.5, max: 50, noNaN: true }),
        (ys, prior, lambda) => {
          const post = new ChangePointPosterior({ scale: "linear", mean: prior.mu0, sigma: prior.sigma0, meanWeight: prior.kappa0, shape: prior.alpha0, expectedRunLength: lambda, pruneBelow: 0, maxHypotheses: 64 });
          for (const y of ys) post.observe(y);
          const brute = brutePosterior(ys, { mu0: prior.mu0, kappa0: prior.kappa0, alpha0: prior.alpha0, beta0: prior.alpha0 * prior.sigma0 ** 2 }, 1 / lambda);
          const { lengths, probabilities } = post.runLengths();
          expect(lengths).toEqual(Array.from({ length: ys.length }, (_, i) => i + 1));
          lengths.forEach((len, i) => expect(Math.abs((probabilities[i] as number) - (brute[len] as number))).toBeLessThan(1e-9));
        },
      ),
      { numRuns: 120 },
    );
  });

  it("recovers the change points and segment means of a piecewise-constant series within a few samples (Adams & MacKay 2007, the behaviour of their Fig. 1, from memory)", () => {
    const rng = new RandomSource("segments");
    const segments = [
      { start: 0, mean: 0.05 },
      { start: 300, mean: 0.12 },
      { start: 520, mean: 0.07 },
      { start: 800, mean: 0.2 },
    ];
    const length = 1000;
    const post = new ChangePointPosterior({ expectedRunLength: 300, burnIn: 50 });
    const onsets = new Set<number>();
    const readings: ChangePointReading[] = [];
    for (let i = 0; i < length; i++) {
      const seg = [...segments].reverse().find((s) => i >= s.start)!;
      const r = post.observe(seg.mean * Math.exp(0.2 * rng.normal())); // log-normal scores, 20 % spread
      readings.push(r);
      if (r.changeProbability > 0.5 && r.onset !== undefined) onsets.add(r.onset);
    }
    for (const [k, seg] of segments.entries()) {
      const end = (segments[k + 1]?.start ?? length) - 1;
      const r = readings[end]!;
      expect(Math.abs((r.onset as number) - seg.start), `onset of segment ${k}`).toBeLessThanOrEqual(3);
      // the level is e^μ, the median of a log-normal segment
      expect(Math.abs((r.level as number) / seg.mean - 1), `level of segment ${k}`).toBeLessThan(0.05);
    }
    // the recent-change probability passes ½ within a few samples of each true change and near no other time
    for (const seg of segments.slice(1)) expect([...onsets].some((o) => Math.abs(o - seg.start) <= 3)).toBe(true);
    expect([...onsets].filter((o) => segments.every((s) => Math.abs(o - s.start) > 10)).length).toBeLessThanOrEqual(1);
  });

  it("keeps at most maxHypotheses, and pruning hardly moves the answer on a long stream", () => {
    const rng = new RandomSource("pruning");
    const xs = Float64Array.from({ length: 3000 }, (_, i) => Math.exp(0.3 * rng.normal() + (i >= 2000 ? 0.6 : 0)));
    const small = new ChangePointPosterior({ mean: 0, sigma: 0.3, maxHypotheses: 32, expectedRunLength: 1000 });
    const large = new ChangePointPosterior({ mean: 0, sigma: 0.3, maxHypotheses: 2048, pruneBelow: 0, expectedRunLength: 1000 });
    let a: ChangePointReading | undefined;
    let b: ChangePointReading | undefined;
    for (const x of xs) {
      a = small.observe(x);
      b = large.observe(x);
      expect(a.hypotheses).toBeLessThanOrEqual(32);
    }
    expect(b!.hypotheses).toBeGreaterThan(900);
    expect(a!.onset).toBe(b!.onset);
    expect(Math.abs(a!.onset! - 2000)).toBeLessThanOrEqual(5);
    expect(a!.level!).toBeCloseTo(b!.level!, 6);
  });

  it("restored from a JSON snapshot during the burn-in or after it, it continues bit for bit", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: 0.01, max: 5, noNaN: true }), { minLength: 2, maxLength: 80 }), fc.integer({ min: 0, max: 79 }), fc.boolean(), (values, cutAt, burn) => {
        const cut = cutAt % values.length;
        const make = (): ChangePointPosterior => (burn ? new ChangePointPosterior({ burnIn: 10, maxHypotheses: 8 }) : new ChangePointPosterior({ mean: 0, sigma: 1, maxHypotheses: 8 }));
        const a = make();
        for (let i = 0; i < cut; i++) a.observe(values[i] as number);
        const b = ChangePointPosterior.restore(throughJson(a.snapshot()));
        expect(b.snapshot()).toEqual(a.snapshot());
        for (let i = cut; i < values.length; i++) expect(b.observe(values[i] as number)).toEqual(a.observe(values[i] as number));
        expect(b.snapshot()).toEqual(a.snapshot());
      }),
      { numRuns: 80 },
    );
  });

  it("on the log scale a zero score is non-finite: refused, or skipped and counted; a non-number or a linear value past 1e100 is refused", () => {
    expectLeewayError(() => new ChangePointPosterior({ mean: 0, sigma: 1 }).observe(0), "E_NON_FINITE", "x");
    const skip = new ChangePointPosterior({ mean: 0, sigma: 1, nonFinite: "skip" });
    expect(skip.observe(0).skipped).toBe(1);
    expect(skip.observe(Number.NaN).skipped).toBe(2);
    expect(new ChangePointPosterior({ mean: 0, sigma: 1, offset: 1 }).observe(0).hypotheses).toBe(1);
    const many = new ChangePointPosterior({ mean: 0, sigma: 1, nonFinite: "skip" });
    many.observeMany(Float64Array.from([1, 0, 2]));
    expect([many.count, many.skipped]).toEqual([2, 1]);
    expectLeewayError(() => new ChangePointPosterior({ mean: 0, sigma: 1 }).observe("5" as never), "E_SAMPLE", "x", "string");
    expectLeewayError(() => new ChangePointPosterior({ mean: 0, sigma: 1, scale: "linear" }).observe(1e200), "E_SAMPLE", "x", "1e+100");
  });

  it("refuses corrupted snapshots", () => {
    const burning = new ChangePointPosterior({ burnIn: 20 });
    burning.observeMany(Float64Array.from({ length: 7 }, (_, i) => 1 + Math.sin(i) / 2));
    expectRefusesCorruptions(ChangePointPosterior.restore, burning.snapshot(), { sizePaths: [["maxHypotheses"], ["burnInLength"]], variableLengthPaths: [["burnIn"]] });
    const running = new ChangePointPosterior({ burnIn: 5, maxHypotheses: 16 });
    running.observeMany(Float64Array.from({ length: 40 }, (_, i) => 1 + (i > 25 ? 1 : 0) + Math.cos(i) / 5));
    expectRefusesCorruptions(ChangePointPosterior.restore, running.snapshot(), { sizePaths: [["maxHypotheses"], ["burnInLength"]], variableLengthPaths: [["lengths"], ["means"], ["rates"], ["weights"], ["gammaRatios"]] });
  });

  it("refuses priors that would turn a reading into NaN or ±Infinity, naming the option, the value and the allowed range; extreme priors inside the ranges keep readings finite and snapshots restorable (common practice, no source)", () => {
    expectLeewayError(() => new ChangePointPosterior({ mean: 0, sigma: 1e300 }), "E_OPTION", "sigma", "1e+300", "[1e-50, 2e+100]");
    expectLeewayError(() => new ChangePointPosterior({ mean: 0, sigma: 1e-300 }), "E_OPTION", "sigma", "1e-300");
    expectLeewayError(() => new ChangePointPosterior({ mean: 1e200, sigma: 1 }), "E_OPTION", "mean", "1e+200", "1e+100");
    expectLeewayError(() => new ChangePointPosterior({ mean: 0, sigma: 1, meanWeight: 1e308 }), "E_OPTION", "meanWeight", "1e+308", "[0.000001, 1000000]");
    expectLeewayError(() => new ChangePointPosterior({ mean: 0, sigma: 1, meanWeight: 1e-308 }), "E_OPTION", "meanWeight");
    expectLeewayError(() => new ChangePointPosterior({ mean: 0, sigma: 1, shape: 1e308 }), "E_OPTION", "shape", "1e+308");
    expectLeewayError(() => new ChangePointPosterior({ mean: 0, sigma: 1, shape: Number.MIN_VALUE }), "E_OPTION", "shape", "5e-324");
    const corners = [
      { mean: 1e100, sigma: 1e-50, meanWeight: 1e-6, shape: 1e-3 },
      { mean: -1e100, sigma: 2e100, meanWeight: 1e6, shape: 1e6 },
      { mean: 0, sigma: 1e-50, meanWeight: 1e6, shape: 1e-3 },
    ];
    const samples = [-1e100, 1e100, 0, 1e-300, 3, -1e100, 1e100, 5e99, 1e100];
    for (const corner of corners) {
      const post = new ChangePointPosterior({ scale: "linear", ...corner, pruneBelow: 0 });
      for (const x of samples) {
        const reading = post.observe(x);
        expect([reading.changeProbability, reading.level], JSON.stringify(corner)).toSatisfy((v: number[]) => v.every(Number.isFinite));
      }
      expect(ChangePointPosterior.restore(throughJson(post.snapshot())).snapshot()).toEqual(post.snapshot());
    }
  });

  it("a burn-in of nearly equal values or of values a whole range apart gives a prior inside the allowed ranges: finite readings, restorable (common practice, no source)", () => {
    for (const values of [[1e-200, 2e-200, 1.5e-200], [-1e100, 1e100, -1e100]]) {
      const post = new ChangePointPosterior({ scale: "linear", burnIn: 3 });
      for (const x of [...values, ...values]) expect(Number.isFinite(post.observe(x).changeProbability)).toBe(true);
      const copy = ChangePointPosterior.restore(throughJson(post.snapshot()));
      expect(copy.observe(0)).toEqual(post.observe(0));
    }
  });

  it("refuses snapshots whose prior, burn-in values, means, rates or gamma ratios lie beyond what the model can reach (common practice, no source)", () => {
    const running = new ChangePointPosterior({ burnIn: 5, scale: "linear", maxHypotheses: 16 });
    running.observeMany(Float64Array.from({ length: 30 }, (_, i) => Math.sin(i)));
    const burning = new ChangePointPosterior({ burnIn: 50, scale: "linear" });
    burning.observeMany(Float64Array.from({ length: 10 }, (_, i) => Math.sin(i)));
    const cases: [ChangePointPosterior, string, number | null, number][] = [
      [running, "priorSigma", null, 1e300],
      [running, "priorMean", null, 1e200],
      [running, "means", 0, 1e200],
      [running, "rates", 0, 1e300],
      [running, "gammaRatios", 0, 1e300],
      [burning, "burnIn", 3, 1e308],
      [running, "meanWeight", null, 1e308],
      [running, "shape", null, 1e-300],
    ];
    for (const [post, field, at, value] of cases) {
      const bad = throughJson(post.snapshot());
      const state = bad.state as unknown as Record<string, number | number[]>;
      if (at === null) state[field] = value;
      else (state[field] as number[])[at] = value;
      expectLeewayError(() => ChangePointPosterior.restore(bad), "E_SNAPSHOT", field);
    }
  });

  it("refuses bad options naming them", () => {
    expectLeewayError(() => new ChangePointPosterior({ expectedRunLength: 1 }), "E_OPTION", "expectedRunLength", "1");
    expectLeewayError(() => new ChangePointPosterior({ mean: 0 }), "E_OPTION", "sigma");
    expectLeewayError(() => new ChangePointPosterior({ mean: 0, sigma: 1, burnIn: 5 }), "E_OPTION", "burnIn");
    expectLeewayError(() => new ChangePointPosterior({ maxHypotheses: 1 }), "E_OPTION", "maxHypotheses");
    expectLeewayError(() => new ChangePointPosterior({ maxHypotheses: 5000 }), "E_OPTION", "maxHypotheses", "5000");
    expectLeewayError(() => new ChangePointPosterior({ scale: "sqrt" as never }), "E_OPTION", "scale", "sqrt");
    expectLeewayError(() => new ChangePointPosterior({ pruneBelow: 0.5 }), "E_OPTION", "pruneBelow");
    expectLeewayError(() => new ChangePointPosterior({ hazard: 0.1 } as never), "E_OPTION", "hazard");
  });
});
