import {
  finiteSamples,
  integerInRange,
  numberInRange,
  optionsObject,
  OptionError,
  positiveNumber,
  RandomSource,
  seedOption,
  StateError,
} from "@leeway/core";
import type { ChangeTest } from "./change-test.js";
import { BlockBootstrap } from "./block-bootstrap.js";

/** Options of {@link calibrateThreshold}. */
export interface CalibrationOptions {
  /** The in-control average run length wanted, in samples (≥ 2). */
  targetArl0: number;
  /** Seed of the bootstrap (a finite number or a non-empty string). */
  seed: number | string;
  /** Bootstrap streams per threshold tried (default 200; the estimate's relative error is about 1/√replicates). */
  replicates?: number;
  /** Block length of the moving-block bootstrap (default round(n^(1/3)), at least 1; lengthen it for autocorrelated scores). */
  blockLength?: number;
  /** Runs are stopped (censored) at this length (default 5·targetArl0). */
  maxRunLength?: number;
  /** First threshold tried when no bracket is given (default 1). */
  initial?: number;
  /** A threshold known to give an ARL0 below the target. */
  lower?: number;
  /** A threshold known to give an ARL0 above the target. */
  upper?: number;
  /** Stop the search when the bracket's upper/lower − 1 falls below this (default 1e-3). */
  tolerance?: number;
}

/** What {@link calibrateThreshold} returns. */
export interface CalibrationResult {
  /** The threshold whose estimated ARL0 reaches the target. */
  threshold: number;
  /** ARL0 at that threshold, re-estimated on fresh bootstrap streams (independent of the search). */
  arl0: number;
  /** A 95 % confidence interval of `arl0`. */
  interval: [number, number];
  /** Bootstrap streams per threshold. */
  replicates: number;
  /** Runs of the final estimate stopped at `maxRunLength` before any alarm. */
  censored: number;
  /** Thresholds evaluated (the final estimate included). */
  evaluations: number;
  /** Samples fed to tests in total (the cost). */
  samples: number;
}

interface RunSummary {
  arl: number;
  exposure: number;
  alarms: number;
  censored: number;
  sumSquares: number;
  samples: number;
}

const NAME = "calibrateThreshold";
const KNOWN = ["targetArl0", "seed", "replicates", "blockLength", "maxRunLength", "initial", "lower", "upper", "tolerance"] as const;
const CHUNK = 4096;

/**
 * Finds the threshold of a change test whose in-control average run length (ARL0) is a target, from
 * reference scores of the in-control stream (for example the commissioning scores).
 *
 * Method: `replicates` endless streams are resampled from the reference by the moving-block bootstrap
 * (Künsch, 1989), which keeps the autocorrelation within a block. For a threshold t, a fresh test
 * `makeTest(t)` runs on each stream (through `scan`) until its first `"change"`; the run length is the
 * number of samples up to and including it. Runs reaching `maxRunLength` are censored there, and
 * ARL0(t) is estimated by the censored-geometric maximum likelihood Σ min(Tᵢ, cap) / #alarms (the plain
 * mean when nothing is censored). The same streams serve every threshold (common random numbers), so
 * the estimate is a monotone step function of t for tests whose alarms come later at higher thresholds;
 * the threshold is found by doubling or halving to a bracket, geometric bisection to within 25 %, and
 * the Illinois variant of regula falsi on ln(ARL0(t)/target) (the smallest threshold found whose
 * estimate reaches the target is returned). An evaluation
 * during the search stops as soon as its remaining runs can no longer move the estimate across the
 * target (each adds between 1 and `maxRunLength` samples and at most one alarm), so thresholds far from
 * the answer cost little. The result's ARL0
 * and interval are then re-estimated on independent streams: the interval is mean ± 1.96·s/√R without
 * censoring, and the exact interval of an exponential mean, 2T/χ²(2d, 0.975) … 2T/χ²(2d, 0.025)
 * (Wilson-Hilferty quantiles), when some runs were censored.
 *
 * `makeTest` must build a test whose ARL0 grows with its threshold; a test that estimates its
 * in-control parameters from a burn-in counts the burn-in in the run length. Cost: about
 * replicates × ARL0 × (evaluations ≈ 15–25) samples.
 * @example
 * const scores = new Float64Array(500).map((_, i) => (i * 7919) % 500 / 500); // uniform-looking scores
 * const result = calibrateThreshold((h) => new Cusum({ mean: 0.5, sigma: 0.29, h, direction: "up" }), scores, { targetArl0: 200, seed: 1 });
 * result.arl0 > 150 && result.arl0 < 260; // true
 */
export function calibrateThreshold(
  makeTest: (threshold: number) => ChangeTest,
  referenceScores: ArrayLike<number>,
  options: CalibrationOptions,
): CalibrationResult {
  if (typeof makeTest !== "function") throw new OptionError(NAME, "makeTest", makeTest, "a function from a threshold to a change test");
  const o = optionsObject<CalibrationOptions>(NAME, options, KNOWN);
  const target = numberInRange(NAME, "targetArl0", o.targetArl0, { min: 2, max: 1e9 });
  const seed = seedOption(NAME, "seed", o.seed);
  const reference = finiteSamples(NAME, "referenceScores", referenceScores);
  if (reference.length < 10) throw new OptionError(NAME, "referenceScores", referenceScores, "an array of at least 10 finite numbers");
  const replicates = o.replicates === undefined ? 200 : integerInRange(NAME, "replicates", o.replicates, 10, 1e6);
  const n = reference.length;
  const blockLength = o.blockLength === undefined ? Math.max(1, Math.round(Math.cbrt(n))) : integerInRange(NAME, "blockLength", o.blockLength, 1, Math.floor(n / 2));
  const cap = o.maxRunLength === undefined ? Math.ceil(5 * target) : integerInRange(NAME, "maxRunLength", o.maxRunLength, Math.ceil(target), 2 ** 40);
  const tolerance = o.tolerance === undefined ? 1e-3 : numberInRange(NAME, "tolerance", o.tolerance, { min: 1e-12, max: 1, minExclusive: false });
  const initial = o.initial === undefined ? 1 : positiveNumber(NAME, "initial", o.initial);
  let lower = o.lower === undefined ? null : positiveNumber(NAME, "lower", o.lower);
  let upper = o.upper === undefined ? null : positiveNumber(NAME, "upper", o.upper);
  if (lower !== null && upper !== null && !(lower < upper)) throw new OptionError(NAME, "upper", upper, `a number > lower = ${lower}`);

  const buffer = new Float64Array(Math.min(CHUNK, cap));
  let evaluations = 0;
  let samples = 0;
  const evaluate = (threshold: number, label: string, decide: number | null = null): RunSummary => {
    evaluations += 1;
    const summary = runLengths(makeTest, threshold, reference, blockLength, replicates, cap, `${String(seed)}/${label}`, buffer, decide);
    samples += summary.samples;
    return summary;
  };
  const reaches = (t: number): boolean => evaluate(t, "search", target).arl >= target;

  // a bracket [lower, upper] with ARL0(lower) < target ≤ ARL0(upper)
  if (lower === null || upper === null) {
    let t = lower ?? upper ?? initial;
    if (reaches(t)) {
      upper = t;
      for (let k = 0; lower === null; k++) {
        if (k > 60) throw new StateError(NAME, `no threshold down to ${t} gives an ARL0 below ${target}; give the bracket with lower and upper`);
        t /= 2;
        if (reaches(t)) upper = t;
        else lower = t;
      }
    } else {
      lower = t;
      for (let k = 0; upper === null; k++) {
        if (k > 60) throw new StateError(NAME, `no threshold up to ${t} reaches an ARL0 of ${target}; the test may never alarm slowly enough on these scores, or the cap maxRunLength = ${cap} is too short`);
        t *= 2;
        if (reaches(t)) upper = t;
        else lower = t;
      }
    }
  }
  let lo = lower;
  let hi = upper;
  // geometric bisection on decisions alone, down to a bracket within 25 %
  for (let it = 0; it < 100 && hi / lo > 1.25 && hi / lo - 1 > tolerance; it++) {
    const mid = Math.sqrt(lo * hi);
    if (reaches(mid)) hi = mid;
    else lo = mid;
  }
  // then the Illinois variant of regula falsi on f(t) = ln(ARL0(t)/target), f(lo) < 0 ≤ f(hi)
  const logRatio = (t: number): number => Math.log(Math.min(evaluate(t, "search").arl, cap * replicates) / target);
  if (hi / lo - 1 > tolerance) {
    let fLo = logRatio(lo);
    let fHi = logRatio(hi);
    let side = 0;
    for (let it = 0; it < 30 && hi / lo - 1 > tolerance && fHi > 1e-3; it++) {
      let t = hi - (fHi * (hi - lo)) / (fHi - fLo);
      if (!(t > lo && t < hi)) t = Math.sqrt(lo * hi);
      const f = logRatio(t);
      if (f >= 0) {
        hi = t;
        fHi = f;
        if (side === 1) fLo /= 2; // Illinois: halve the end that stayed
        side = 1;
      } else {
        lo = t;
        fLo = f;
        if (side === -1) fHi /= 2;
        side = -1;
      }
    }
  }
  const best = hi;
  const final = evaluate(best, "estimate");
  return {
    threshold: best,
    arl0: final.arl,
    interval: confidenceInterval(final, replicates),
    replicates,
    censored: final.censored,
    evaluations,
    samples,
  };
}

/** Runs `replicates` bootstrap streams through fresh tests at one threshold. */
function runLengths(
  makeTest: (threshold: number) => ChangeTest,
  threshold: number,
  reference: Float64Array,
  blockLength: number,
  replicates: number,
  cap: number,
  seed: string,
  buffer: Float64Array,
  decide: number | null,
): RunSummary {
  let exposure = 0;
  let alarms = 0;
  let censored = 0;
  let sumSquares = 0;
  let samples = 0;
  for (let r = 0; r < replicates; r++) {
    const test = makeTest(threshold);
    const stream = new BlockBootstrap(reference, blockLength, new RandomSource(`${seed}/${r}`));
    let done = 0;
    let length = -1;
    while (done < cap) {
      const take = Math.min(buffer.length, cap - done);
      const chunk = take === buffer.length ? buffer : buffer.subarray(0, take);
      stream.fill(chunk);
      const hit = test.scan(chunk, 0);
      if (hit >= 0) {
        length = done + hit + 1;
        break;
      }
      done += take;
    }
    if (length < 0) {
      censored += 1;
      exposure += cap;
      samples += cap;
    } else {
      alarms += 1;
      exposure += length;
      sumSquares += length * length;
      samples += length;
    }
    if (decide !== null) {
      // Stop as soon as the remaining runs cannot change which side of `decide` the estimate falls:
      // they add at least 1 and at most `cap` samples each, and at most one alarm each.
      const remaining = replicates - r - 1;
      const lowest = (exposure + remaining) / (alarms + remaining);
      const highest = alarms > 0 ? (exposure + remaining * cap) / alarms : Infinity;
      if (lowest >= decide) return { arl: lowest, exposure, alarms, censored, sumSquares, samples };
      if (highest < decide) return { arl: highest, exposure, alarms, censored, sumSquares, samples };
    }
  }
  return { arl: alarms > 0 ? exposure / alarms : Infinity, exposure, alarms, censored, sumSquares, samples };
}

function confidenceInterval(s: RunSummary, replicates: number): [number, number] {
  if (s.alarms === 0) return [(2 * s.exposure) / chiSquareQuantile(2, Z_95_ONE_SIDED), Infinity];
  if (s.censored === 0) {
    const mean = s.exposure / replicates;
    const variance = Math.max(0, (s.sumSquares - replicates * mean * mean) / (replicates - 1));
    const half = Z_975 * Math.sqrt(variance / replicates);
    return [Math.max(1, mean - half), mean + half];
  }
  const dof = 2 * s.alarms;
  return [(2 * s.exposure) / chiSquareQuantile(dof, Z_975), (2 * s.exposure) / chiSquareQuantile(dof, -Z_975)];
}

const Z_975 = 1.959963984540054; // Φ⁻¹(0.975)
const Z_95_ONE_SIDED = 1.6448536269514722; // Φ⁻¹(0.95)

/** The χ² quantile with `dof` degrees of freedom at the normal quantile z, by Wilson & Hilferty (1931). */
function chiSquareQuantile(dof: number, z: number): number {
  const a = 2 / (9 * dof);
  const c = 1 - a + z * Math.sqrt(a);
  return dof * c * c * c;
}
