/**
 * Samples per block of the scan loops. The CUSUM-type loops store their sums for one block and find
 * the last zero afterwards by a short backward search, so that the hot loop has no data-dependent
 * branch (on random scores such a branch is mispredicted half the time).
 */
export const SCAN_BLOCK = 256;

// The loops write max(a, 0) as (a + |a|)/2: no branch, exact for every finite a (+0 for a ≤ 0).
// They write it inline, because a call through an imported binding can cost a getter per sample
// where modules are loaded by a bundler's runtime.

/** The last position q < length with values[q] === 0, or −1. */
export function lastZero(values: Float64Array, length: number): number {
  for (let q = length - 1; q >= 0; q--) if (values[q] === 0) return q;
  return -1;
}

/** The last position q < length with values[q] ≤ 0, or −1. */
export function lastNonPositive(values: Float64Array, length: number): number {
  for (let q = length - 1; q >= 0; q--) if ((values[q] as number) <= 0) return q;
  return -1;
}

/** The last position q < length with values[q] ≥ 0, or −1. */
export function lastNonNegative(values: Float64Array, length: number): number {
  for (let q = length - 1; q >= 0; q--) if ((values[q] as number) >= 0) return q;
  return -1;
}
