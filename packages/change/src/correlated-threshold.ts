import { finiteSamples, nonNegativeNumber, numberInRange, optionsObject, positiveInteger } from "@leeway/core";
import type { ChangeTest } from "./change-test.js";
import { calibrateThreshold } from "./calibrate-threshold.js";
import { cusumArl } from "./cusum-arl.js";

const NAME = "correlatedCusumThreshold";

/** The in-control run length the bootstrap calibration works at before scaling to the target, in samples. */
export const PILOT_ARL0 = 1000;

/** Options of {@link correlatedCusumThreshold}. */
export interface CorrelatedThresholdOptions {
  /** Target in-control average run length, in samples. */
  targetArl0: number;
  /** Bootstrap replicates of the pilot calibration (at least 10). */
  replicates: number;
  /** Seed of the bootstrap. */
  seed: number | string;
  /** Reference value of the CUSUM the test behaves like, in σ (0.5 for a CUSUM tuned to a 1σ shift). */
  k: number;
}

/**
 * The threshold that gives a two-sided CUSUM-like test (made by `make`, on
 * normalised scores: in-control mean 0, σ 1) an in-control average run length
 * of `targetArl0` samples on streams like `normalScores`.
 *
 * Method: {@link calibrateThreshold} finds, by moving-block
 * bootstrap of the normal scores (blocks of {@link CALIBRATION_BLOCK}, which
 * keeps their short-range correlation and their shape), the threshold h_b
 * for a pilot ARL0 of min(target, {@link PILOT_ARL0}). A correlated stream
 * behaves like independent normal scores whose standard deviation is the
 * long-run one, ν (Brownian approximation): the CUSUM (k, h) on it runs like
 * (k/ν, h/ν) on N(0, 1). ν is solved from ARL_S(k/ν, h_b/ν) = pilot with
 * Siegmund's approximation ARL_S, and the result is ν·h' with
 * ARL_S(k/ν, h') = target. ν is kept ≥ 1 (a few hundred calibration samples
 * can understate correlation; no stream is better behaved than white noise).
 * A direct bootstrap at a target of 10⁴–10⁵ samples would cost seconds at
 * every commissioning; this costs milliseconds.
 * @example
 * const z = Float64Array.from({ length: 600 }, (_, i) => Math.sin(i * 1.3) + Math.sin(i * 0.7));
 * const h = correlatedCusumThreshold((t) => new Cusum({ k: 0.5, h: t, mean: 0, sigma: 1, direction: "both" }), z, { targetArl0: 20000, replicates: 20, seed: 1, k: 0.5 });
 * h >= gaussianThreshold(20000); // true: never below the white-noise threshold
 */
export function correlatedCusumThreshold(make: (threshold: number) => ChangeTest, normalScores: Float64Array, options: CorrelatedThresholdOptions): number {
  const o = optionsObject<CorrelatedThresholdOptions>(NAME, options, ["targetArl0", "replicates", "seed", "k"]);
  const targetArl0 = numberInRange(NAME, "targetArl0", o.targetArl0, { min: 2, max: 1e9 });
  const k = nonNegativeNumber(NAME, "k", o.k);
  const { replicates, seed } = o;
  finiteSamples(NAME, "normalScores", normalScores);
  const pilot = Math.min(targetArl0, PILOT_ARL0);
  const gaussianPilot = gaussianThreshold(pilot, k);
  const result = calibrateThreshold(make, normalScores, {
    targetArl0: pilot,
    seed,
    replicates,
    blockLength: Math.min(CALIBRATION_BLOCK, Math.max(1, normalScores.length >> 2)),
    initial: gaussianPilot,
    tolerance: 0.005,
  });
  const hb = result.threshold;
  // ν: ARL_S(k/ν, h_b/ν) falls as ν grows; bisection on [1, 10].
  let lo = 1;
  let hi = 10;
  if (cusumArl(k, hb, 0, { sides: 2 }) <= pilot) hi = 1;
  for (let i = 0; i < 50 && hi > lo; i++) {
    const nu = 0.5 * (lo + hi);
    if (cusumArl(k / nu, hb / nu, 0, { sides: 2 }) > pilot) lo = nu;
    else hi = nu;
  }
  const nu = Math.max(1, 0.5 * (lo + hi), batchMeansSpreadUpper(normalScores, CALIBRATION_BLOCK));
  return nu * gaussianThreshold(targetArl0, k / nu);
}

/**
 * The long-run standard deviation ν of a stream by non-overlapping batch
 * means of length m: ν² ≈ m · var(batch means) (common practice in
 * simulation output analysis). 1 when there are fewer than 5 batches.
 */
export function batchMeansSpread(xs: Float64Array, m: number): number {
  checkBatchMeans("batchMeansSpread", xs, m);
  return spreadOfBatchMeans(xs, m);
}

/** Refuses a series that is not all finite numbers and a batch length that is not a positive integer. */
function checkBatchMeans(component: string, xs: unknown, m: unknown): void {
  finiteSamples(component, "xs", xs);
  positiveInteger(component, "m", m);
}

/** ν of {@link batchMeansSpread}, on checked arguments. */
function spreadOfBatchMeans(xs: Float64Array, m: number): number {
  const batches = Math.floor(xs.length / m);
  if (batches < 5) return 1;
  let sum = 0;
  let sumSquares = 0;
  for (let b = 0; b < batches; b++) {
    let mean = 0;
    for (let i = b * m; i < (b + 1) * m; i++) mean += xs[i] as number;
    mean /= m;
    sum += mean;
    sumSquares += mean * mean;
  }
  const grand = sum / batches;
  const variance = (sumSquares - batches * grand * grand) / (batches - 1);
  return Math.sqrt(Math.max(0, m * variance));
}

/**
 * An upper 90 % confidence bound of the long-run standard deviation by batch
 * means: ν·√((B − 1)/χ²₀.₁(B − 1)) for B batches, with the Wilson-Hilferty
 * approximation of the chi-square quantile (Wilson & Hilferty, 1931). A
 * calibration window of a few hundred samples pins ν down only to ±15 %, and
 * the in-control run length of a CUSUM is steep in ν: the bound keeps the
 * threshold on the safe side.
 */
export function batchMeansSpreadUpper(xs: Float64Array, m: number): number {
  checkBatchMeans("batchMeansSpreadUpper", xs, m);
  const batches = Math.floor(xs.length / m);
  if (batches < 5) return 1;
  const df = batches - 1;
  const c = 2 / (9 * df);
  const chi = df * (1 - c - 1.2815515655446004 * Math.sqrt(c)) ** 3; // χ² quantile at 0.1
  return spreadOfBatchMeans(xs, m) * Math.sqrt(df / chi);
}


/** Block length of the calibration bootstrap, in samples. */
export const CALIBRATION_BLOCK = 20;

/** The two-sided CUSUM decision interval h (reference value k, default 0.5) whose ARL0 on independent N(0, 1) scores is `targetArl0` (Siegmund, 1985), by bisection. */
export function gaussianThreshold(targetArl0: number, k = 0.5): number {
  numberInRange("gaussianThreshold", "targetArl0", targetArl0, { min: 1, max: 1e12 });
  nonNegativeNumber("gaussianThreshold", "k", k);
  let lo = 0.01;
  let hi = 200;
  for (let i = 0; i < 60; i++) {
    const mid = 0.5 * (lo + hi);
    if (cusumArl(k, mid, 0, { sides: 2 }) < targetArl0) lo = mid;
    else hi = mid;
  }
  return hi;
}
