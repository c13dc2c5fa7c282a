import type { ChangeDirection, ChangeReading } from "./change-test.js";

/**
 * Scratch space of one test for {@link sumsReading}: the two watched sums and the two onsets, read
 * back by the index of the side chosen. Reading a pair by a 0/1 index
 * instead of choosing with `?:` keeps the choice off the branch predictor: on in-control scores the
 * side changes at random, and a mispredicted branch there cost more than the rest of the reading.
 */
export class SumsScratch {
  readonly sums = new Float64Array(2);
  // Smis and undefined: slots 2 and 3 stand for "no active side"
  readonly onsets: (number | undefined)[] = [0, 0, undefined, undefined];
}

// "up" on a tie, as `up >= lo ? "up" : "down"` chose; undefined while both sums are 0
const DIRECTIONS: readonly (ChangeDirection | undefined)[] = ["up", "down", undefined, undefined];

/**
 * The reading of a test with an upper and a lower sum (CUSUM): the statistic is the
 * larger watched sum, the direction its side ("up" on a tie), the onset the sample after that side
 * was last zero; direction and onset are undefined while the statistic is 0. Every reading has the
 * same object shape. `up` and `lo` are the watched sums (0 for a side not watched); the status is
 * `"change"` when `change`, else `"warning"` once the statistic passes `warningLevel`.
 */
export function sumsReading(scratch: SumsScratch, index: number, change: boolean, warningLevel: number, up: number, lo: number, upperZero: number, lowerZero: number, threshold: number, skipped: number): ChangeReading {
  const sums = scratch.sums;
  sums[0] = up;
  sums[1] = lo;
  const side = +(up < lo); // 0: the upper sum, 1: the lower sum
  const statistic = sums[side] as number;
  const status = change ? "change" : statistic > warningLevel ? "warning" : "stable";
  const onsets = scratch.onsets;
  onsets[0] = upperZero + 1;
  onsets[1] = lowerZero + 1;
  const pick = side + 2 * +!(statistic > 0);
  return { index, status, statistic, threshold, direction: DIRECTIONS[pick], onset: onsets[pick], skipped };
}
