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
