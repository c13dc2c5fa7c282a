import { DimensionError, numberInRange } from "@leeway/core";
import type { RunLengths } from "./metrics.js";
import { poissonInterval } from "./poisson-interval.js";

/**
 * Empirical in-control run lengths. `excluded[i]` = 1 marks samples at which
 * no false alarm can occur (commissioning, events); `falseAlarmAt[i]` = 1
 * marks false alarms. A run starts at the first in-control sample after an
 * excluded stretch or a false alarm and ends at the next false alarm
 * (completed, length counted through the alarm sample) or is censored by an
 * excluded sample or the stream's end.
 *
 * ARL = exposure / k for k false alarms over `exposure` in-control samples —
 * the maximum-likelihood estimate of 1/p for a constant per-sample false
 * alarm probability p, censored runs included — and the interval
 * [exposure / μ_U, exposure / μ_L] from the exact Poisson limits of Garwood
 * (1936) for k (μ_L = 0 when k = 0: the upper bound is then null, unbounded).
 * A false alarm flagged at an excluded sample is not counted.
 * @example
 * // in control 0–3 and 6–9, false alarms at 1 and 8
 * const r = runLengths(Uint8Array.of(0, 0, 0, 0, 1, 1, 0, 0, 0, 0), Uint8Array.of(0, 1, 0, 0, 0, 0, 0, 0, 1, 0));
 * [r.completed, r.censored, r.arl]; // [[2, 3], [2, 1], 4]
 */
export function runLengths(excluded: Uint8Array, falseAlarmAt: Uint8Array, level = 0.95): RunLengths {
  if (falseAlarmAt.length !== excluded.length) throw new DimensionError("runLengths", "falseAlarmAt", excluded.length, falseAlarmAt.length);
  numberInRange("runLengths", "level", level, { min: 0, max: 1, minExclusive: true, maxExclusive: true });
  const completed: number[] = [];
  const censored: number[] = [];
  let exposure = 0;
  let runStart = -1;
  for (let i = 0; i < excluded.length; i++) {
    if (excluded[i] === 1) {
      if (runStart >= 0) censored.push(i - runStart);
      runStart = -1;
      continue;
    }
    exposure++;
    if (runStart < 0) runStart = i;
    if (falseAlarmAt[i] === 1) {
      completed.push(i - runStart + 1);
      runStart = -1;
    }
  }
  if (runStart >= 0) censored.push(excluded.length - runStart);
  const falseAlarms = completed.length;
  const counts = poissonInterval(falseAlarms, level);
  return {
    exposure,
    falseAlarms,
    completed,
    censored,
    arl: falseAlarms > 0 ? exposure / falseAlarms : null,
    interval: { level, lower: exposure / counts.upper, upper: counts.lower > 0 ? exposure / counts.lower : null },
  };
}
