import type { SnapshotReader } from "@leeway/core";

/**
 * In-control mean and standard deviation estimated from the first samples of a stream
 * (Welford, 1962: n ← n + 1, d = x − x̄, x̄ ← x̄ + d/n, M₂ ← M₂ + d·(x − x̄); s = √(M₂/(n − 1))).
 * The burn-in ends after `length` samples, or later if they were all equal (s would be 0).
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

/** Adds one sample; returns true when the estimate is complete (n ≥ length and M₂ > 0). */
export function burnInStep(b: BurnIn, x: number, length: number): boolean {
  b.count += 1;
  const d = x - b.mean;
  b.mean += d / b.count;
  b.m2 += d * (x - b.mean);
  return b.count >= length && b.m2 > 0;
}

/** The sample standard deviation of a complete burn-in. */
export function burnInSigma(b: BurnIn): number {
  return Math.sqrt(b.m2 / (b.count - 1));
}

/** Reads a burn-in written by a snapshot. */
export function readBurnIn(reader: SnapshotReader): BurnIn {
  const r = reader.object("burnIn");
  const count = r.integer("count", 0, Number.MAX_SAFE_INTEGER);
  const mean = r.number("mean");
  const m2 = r.numberIn("m2", 0, Number.MAX_VALUE);
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
  if (!((sigma as number) > 0)) r.fail("sigma", `must be > 0, got ${String(sigma)}`);
  return { options, estimated: { mean: mean as number, sigma: sigma as number }, burnIn: null };
}
