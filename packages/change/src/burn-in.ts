import { finiteNumber, integerInRange, numberInRange, OptionError, type SnapshotReader } from "@leeway/core";
import { MAX_SAMPLE_MAGNITUDE } from "@leeway/stats";

/**
 * The smallest σ a chart standardises by, in score units: with samples and μ₀ within ±10¹⁰⁰ every
 * standardised sample stays within ±2·10²⁰⁰, so no sum or square of the charts overflows. A burn-in
 * whose σ is smaller (its samples all equal, in practice) goes on.
 */
export const MIN_SIGMA = 1e-100;

/**
 * In-control mean and standard deviation estimated from the first samples of a stream
 * (Welford, 1962: n ← n + 1, d = x − x̄, x̄ ← x̄ + d/n, M₂ ← M₂ + d·(x − x̄); s = √(M₂/(n − 1))).
 * The burn-in ends after `length` samples, or later while s < {@link MIN_SIGMA} (samples all equal, in practice).
 */
export interface BurnIn {
  /** Samples taken into the estimate. */
  count: number;
  /** Running mean x̄. */
  mean: number;
  /** Sum of squared deviations M₂. */
  m2: number;
}

/** A fresh, empty burn-in estimate. */
export function emptyBurnIn(): BurnIn {
  return { count: 0, mean: 0, m2: 0 };
}

/** Adds one sample; returns true when the estimate is complete (n ≥ length and s ≥ {@link MIN_SIGMA}). */
export function burnInStep(b: BurnIn, x: number, length: number): boolean {
  b.count += 1;
  const d = x - b.mean;
  b.mean += d / b.count;
  b.m2 += d * (x - b.mean);
  return b.count >= length && b.m2 >= MIN_SIGMA * MIN_SIGMA * (b.count - 1);
}

/** μ₀ and σ of a chart, given as options or to be estimated by a burn-in, as its constructor keeps them. */
export interface InControlSetting {
  /** μ₀, NaN while burning in. */
  mean: number;
  /** σ, NaN while burning in. */
  sigma: number;
  /** Samples of the burn-in, 0 when μ₀ and σ are given. */
  burnInLength: number;
  /** The burn-in in progress, or null. */
  burnIn: BurnIn | null;
}

/**
 * Validates the options `mean`, `sigma` and `burnIn` of a chart that standardises its samples: μ₀ within
 * ±{@link MAX_SAMPLE_MAGNITUDE} and σ ≥ {@link MIN_SIGMA} (both finite), or a burn-in of at least 2 samples.
 */
export function inControlOptions(component: string, o: { mean?: number; sigma?: number; burnIn?: number }): InControlSetting {
  if (o.mean !== undefined || o.sigma !== undefined) {
    if (o.burnIn !== undefined) throw new OptionError(component, "burnIn", o.burnIn, "absent when mean and sigma are given");
    const mean = numberInRange(component, "mean", o.mean, { min: -MAX_SAMPLE_MAGNITUDE, max: MAX_SAMPLE_MAGNITUDE });
    const sigma = finiteNumber(component, "sigma", o.sigma);
    if (!(sigma >= MIN_SIGMA)) throw new OptionError(component, "sigma", sigma, `a finite number >= ${MIN_SIGMA}`);
    return { mean, sigma, burnInLength: 0, burnIn: null };
  }
  if (o.burnIn === undefined) throw new OptionError(component, "burnIn", o.burnIn, "an integer >= 2 when mean and sigma are not given");
  const burnInLength = integerInRange(component, "burnIn", o.burnIn, 2, 2 ** 31 - 1);
  return { mean: Number.NaN, sigma: Number.NaN, burnInLength, burnIn: emptyBurnIn() };
}

/** The sample standard deviation of a complete burn-in. */
export function burnInSigma(b: BurnIn): number {
  return Math.sqrt(b.m2 / (b.count - 1));
}

/** Reads a burn-in written by a snapshot. */
export function readBurnIn(reader: SnapshotReader): BurnIn {
  const r = reader.object("burnIn");
  const count = r.integer("count", 0, Number.MAX_SAFE_INTEGER);
  // a running mean of accepted samples, and M₂ ≤ n·(2·10¹⁰⁰)²: what the burn-in can reach
  const mean = r.numberIn("mean", -MAX_SAMPLE_MAGNITUDE, MAX_SAMPLE_MAGNITUDE);
  const m2 = r.numberIn("m2", 0, count * 4 * MAX_SAMPLE_MAGNITUDE * MAX_SAMPLE_MAGNITUDE);
  if (count === 0 && mean !== 0) r.fail("burnIn.mean", "must be 0 before the first sample");
  return { count, mean, m2 };
}

/**
 * The in-control level (μ₀, σ) of a chart as a snapshot holds it: given as
 * options, estimated by a finished burn-in, or still being estimated. Read
 * and cross-checked in one place for every chart that standardises its input.
 */
export interface InControlLevel {
  /** The options to rebuild the chart with: μ₀ and σ when they were given, or the burn-in length. */
  options: { mean: number | undefined; sigma: number | undefined; burnIn: number | undefined };
  /** μ₀ and σ estimated by a burn-in that has ended, or null. */
  estimated: { mean: number; sigma: number } | null;
  /** The burn-in still in progress, or null. */
  burnIn: BurnIn | null;
}

/** Reads and validates the fields `burnInLength`, `burnIn`, `mean` and `sigma` of a chart's snapshot state. */
export function readInControlLevel(r: SnapshotReader, count: number): InControlLevel {
  const burnInLength = r.integer("burnInLength", 0, 2 ** 31 - 1);
  const burnIn = r.objectOrNull("burnIn") === null ? null : readBurnIn(r);
  const mean = r.numberOrNull("mean");
  const sigma = r.numberOrNull("sigma");
  const known = burnIn === null;
  if (known !== (mean !== null) || known !== (sigma !== null)) r.fail("burnIn", "must be null exactly when mean and sigma are known");
  if (!known && burnInLength === 0) r.fail("burnInLength", "must be > 0 while burning in");
  if (burnIn !== null && burnIn.count > count) r.fail("burnIn.count", "cannot exceed count");
  if (burnInLength === 0) {
    return { options: { mean: mean as number, sigma: sigma as number, burnIn: undefined }, estimated: null, burnIn: null };
  }
  const options = { mean: undefined, sigma: undefined, burnIn: burnInLength };
  if (!known) return { options, estimated: null, burnIn };
  // the burn-in has ended: μ₀ and σ were estimated
  if (!((sigma as number) >= MIN_SIGMA)) r.fail("sigma", `must be >= ${MIN_SIGMA}, got ${String(sigma)}`);
  if (!(Math.abs(mean as number) <= MAX_SAMPLE_MAGNITUDE)) r.fail("mean", `must be within ±${MAX_SAMPLE_MAGNITUDE}, got ${String(mean)}`);
  return { options, estimated: { mean: mean as number, sigma: sigma as number }, burnIn: null };
}
