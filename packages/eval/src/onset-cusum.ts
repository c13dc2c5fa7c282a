import { cusumArl } from "@leeway/change";

/** What {@link onsetCusumAlarms} needs to know: the truth it is tuned with. */
export interface OnsetCusumInput {
  /** A score per sample (the frozen commissioning model's), > 0 from `calibrationStart` on. */
  scores: Float64Array;
  /** First sample of the calibration span, whose log scores give the in-control mean and σ. */
  calibrationStart: number;
  /** First sample after it; the chart runs from here. */
  calibrationEnd: number;
  /** The true events, in start order: [start, end). */
  events: readonly { start: number; end: number }[];
  /** In-control average run length h is set for, in samples. */
  targetArl0: number;
}

/** Smallest shift the chart is tuned for, in σ (k = δ/2 is then 0.125). */
const MIN_SHIFT = 0.25;

/**
 * A one-sided tabular CUSUM (Page, 1954) on the standardised log score,
 * tuned with the truth known — an oracle that no deployed policy can be,
 * against which the engine's detection delay is compared. For each event
 * the true mean shift δ of the standardised log score over the event
 * (at least 0.25 σ in size) sets the direction and the reference value
 * k = |δ|/2, the optimal choice for a step of δ (Montgomery, ISQC §9.1);
 * before the first event k = 0.5 upward. h is set for an in-control ARL of
 * `targetArl0` by Siegmund's approximation ({@link cusumArl}). The statistic
 * S = max(0, S ± z − k) restarts at every true onset; after an alarm the
 * chart signals again only once S has fallen back to 0 (the shift has
 * passed), so a persisting shift gives one alarm.
 * Returns one flag per sample: 1 where S crossed h.
 * @example
 * const scores = Float64Array.from({ length: 400 }, (_, i) => Math.exp((i >= 300 ? 3 : 0) + 0.1 * Math.sin(i * 12.9898)));
 * const flags = onsetCusumAlarms({ scores, calibrationStart: 0, calibrationEnd: 200, events: [{ start: 300, end: 400 }], targetArl0: 1000 });
 * flags.indexOf(1); // 300
 */
export function onsetCusumAlarms(input: OnsetCusumInput): Uint8Array {
  const { scores, calibrationStart, calibrationEnd, events, targetArl0 } = input;
  const n = scores.length;
  let mean = 0;
  let m2 = 0;
  let count = 0;
  for (let i = calibrationStart; i < calibrationEnd; i++) {
    const u = Math.log(scores[i] as number);
    count++;
    const d = u - mean;
    mean += d / count;
    m2 += d * (u - mean);
  }
  const sd = Math.sqrt(m2 / Math.max(1, count - 1)) || 1;
  const z = new Float64Array(n);
  for (let i = calibrationEnd; i < n; i++) z[i] = (Math.log(scores[i] as number) - mean) / sd;

  const flags = new Uint8Array(n);
  const segments = [{ from: calibrationEnd, shift: 1 }, ...events.map((e) => ({ from: Math.max(e.start, calibrationEnd), shift: trueShift(z, e.start, Math.min(e.end, n)) }))];
  segments.forEach((seg, s) => {
    const to = Math.min(n, segments[s + 1]?.from ?? n);
    const sign = seg.shift >= 0 ? 1 : -1;
    const k = Math.max(MIN_SHIFT, Math.abs(seg.shift)) / 2;
    const h = thresholdFor(k, targetArl0);
    let statistic = 0;
    let armed = true;
    for (let i = seg.from; i < to; i++) {
      statistic = Math.max(0, statistic + sign * (z[i] as number) - k);
      if (statistic === 0) armed = true;
      else if (armed && statistic > h) {
        flags[i] = 1;
        armed = false;
      }
    }
  });
  return flags;
}

function trueShift(z: Float64Array, start: number, end: number): number {
  let sum = 0;
  for (let i = start; i < end; i++) sum += z[i] as number;
  return end > start ? sum / (end - start) : 0;
}

/** h with a one-sided in-control ARL of `arl0` (bisection on Siegmund's approximation, which rises with h). */
function thresholdFor(k: number, arl0: number): number {
  let lo = 0.01;
  let hi = 200;
  for (let it = 0; it < 60; it++) {
    const mid = 0.5 * (lo + hi);
    if (cusumArl(k, mid, 0, { sides: 1 }) < arl0) lo = mid;
    else hi = mid;
  }
  return hi;
}
