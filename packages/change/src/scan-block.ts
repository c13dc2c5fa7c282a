import { NonFiniteError, SampleError } from "@leeway/core";
import { MAX_SAMPLE_MAGNITUDE } from "@leeway/stats";

/**
 * Samples per block of the scan loops. The CUSUM-type loops store their sums for one block and find
 * the last zero afterwards by a short backward search, so that the hot loop has no data-dependent
 * branch (on random scores such a branch is mispredicted half the time).
 */
export const SCAN_BLOCK = 256;

// The loops write max(a, 0) as (a + |a|)/2: no branch, exact for every finite a (+0 for a ≤ 0).
// They write it inline, because a call through an imported binding can cost a getter per sample
// where modules are loaded by a bundler's runtime.

/**
 * Slots that every scan's state array shares: the stream index of the next sample, the samples
 * skipped, where the loop stopped, the non-finite policy (1: refuse) and the stream indices of the
 * last zero of each side. A loop's own slots start at `own`.
 */
export const SCAN = { idx: 0, skipped: 1, j: 2, refuse: 3, uz: 4, lz: 5, own: 6 } as const;

/** Loads the shared slots of a scan's state array before the loop runs. */
export function openScan(s: Float64Array, count: number, skipped: number, refuse: boolean, upperZero: number, lowerZero: number): void {
  s[SCAN.idx] = count + skipped;
  s[SCAN.skipped] = skipped;
  s[SCAN.refuse] = refuse ? 1 : 0;
  s[SCAN.uz] = upperZero;
  s[SCAN.lz] = lowerZero;
}

/**
 * Ends one block of a scan loop that ran over xs[blockStart, j) and stopped at `j` (below `end`
 * when a sample outside the accepted range stopped it): records the last zeros of the block
 * (positions qUp, qLow in the block, or −1), advances the stream index, and steps over a
 * non-finite sample under `nonFinite: "skip"`. Writes where to go on into `s[SCAN.j]` and returns
 * true when the scan is over (an alarm, the end of xs, or a sample to refuse).
 */
export function closeBlock(s: Float64Array, xs: Float64Array, blockStart: number, j: number, end: number, found: number, qUp: number, qLow: number): boolean {
  let idx = s[SCAN.idx] as number;
  if (qUp >= 0) s[SCAN.uz] = idx + qUp;
  if (qLow >= 0) s[SCAN.lz] = idx + qLow;
  idx += j - blockStart;
  const n = xs.length;
  let done = found >= 0 || j >= n;
  if (!done && j < end) {
    const x = xs[j] as number;
    if (s[SCAN.refuse] === 1 || x - x === 0) done = true; // refused, or finite but out of range
    else {
      s[SCAN.skipped] = (s[SCAN.skipped] as number) + 1;
      idx++;
      j++;
      done = j >= n;
    }
  }
  s[SCAN.idx] = idx;
  s[SCAN.j] = j;
  return done;
}

/** Where a scan left the stream: the finite samples taken, the samples skipped and the last zero of each side. */
export interface ScanPosition {
  count: number;
  skipped: number;
  upperZero: number;
  lowerZero: number;
}

/** Reads the shared slots back after a scan loop. */
export function scanPosition(s: Float64Array): ScanPosition {
  const skipped = s[SCAN.skipped] as number;
  return { count: (s[SCAN.idx] as number) - skipped, skipped, upperZero: s[SCAN.uz] as number, lowerZero: s[SCAN.lz] as number };
}

/**
 * After a scan loop: throws for the sample it stopped at when that was neither an alarm nor the end
 * (a non-finite sample under `"refuse"`, or a finite one beyond the accepted range); else returns `found`.
 */
export function finishScan(component: string, xs: Float64Array, s: Float64Array, found: number): number {
  const stop = s[SCAN.j] as number;
  if (found >= 0 || stop >= xs.length) return found;
  const x = xs[stop] as number;
  if (x - x === 0) throw new SampleError(component, `xs[${stop}]`, x, `a finite number in [${-MAX_SAMPLE_MAGNITUDE}, ${MAX_SAMPLE_MAGNITUDE}]`);
  throw new NonFiniteError(component, `xs[${stop}]`, x);
}

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
