import { ksTwoSample, mannKendall } from "@leeway/stats";
import { formatNumber } from "../report/scale.js";

/** Significance below which the scores are said to hold a change or a trend. */
const SIGNIFICANCE = 0.001;
/** Block means the trend check runs on (Mann-Kendall is O(n²)). */
const TREND_BLOCKS = 200;

/**
 * What a calibration's user should know before trusting its threshold:
 * that the interval of the ARL0 misses the target; that the scores hold a
 * change (two-sample Kolmogorov-Smirnov, first half against second half) or
 * a monotone trend (Mann-Kendall on up to 200 block means), each at
 * p < 0.001, so that they are not in-control scores; and how many more
 * replicates or scores would narrow the estimate.
 * @example
 * calibrationWarnings(scores, { arl0: 1716, interval: [1498, 1934], replicates: 200 }, 2000)[0];
 * // "the target ARL0 2000 lies outside the 95 % interval 1498 to 1934 …"
 */
export function calibrationWarnings(scores: Float64Array, result: { arl0: number; interval: readonly [number, number] | number[]; replicates: number }, target: number): string[] {
  const out: string[] = [];
  const [lo, hi] = result.interval as [number, number];
  const n = scores.length;
  if (target < lo || target > hi) {
    out.push(
      `the target ARL0 ${target} lies outside the 95 % interval ${Math.round(lo)} to ${Math.round(hi)}: the threshold gives about ${Math.round(result.arl0)} samples between false alarms, not ${target}. ` +
        `--replicates ${4 * result.replicates} (4× the streams) halves the interval's Monte Carlo width; the sampling error of the scores themselves, which the interval does not cover, halves with 4× as many scores (${4 * n} instead of ${n}).`,
    );
  }
  const half = n >> 1;
  if (half >= 10) {
    const ks = ksTwoSample(scores.subarray(0, half), scores.subarray(half));
    if (ks.pValue < SIGNIFICANCE) out.push(`the scores' first and second halves differ (Kolmogorov-Smirnov D = ${formatNumber(ks.d)}, p = ${ks.pValue.toExponential(1)}): they hold a change, so they are not in-control scores; calibrate on a span without changes of conditions or faults.`);
  }
  const blocks = Math.min(TREND_BLOCKS, Math.floor(n / 5));
  if (blocks >= 10) {
    const means = new Float64Array(blocks);
    for (let b = 0; b < blocks; b++) {
      const from = Math.floor((b * n) / blocks);
      const to = Math.floor(((b + 1) * n) / blocks);
      let s = 0;
      for (let i = from; i < to; i++) s += scores[i] as number;
      means[b] = s / (to - from);
    }
    const mk = mannKendall(means);
    if (mk.pValue < SIGNIFICANCE) out.push(`the scores drift ${mk.s > 0 ? "upward" : "downward"} (Mann-Kendall z = ${formatNumber(mk.z)} over ${blocks} block means, p = ${mk.pValue.toExponential(1)}): they are not in-control scores, and a threshold calibrated on them is too lenient; calibrate on a span without a trend.`);
  }
  return out;
}
