import { finiteNumber, finiteSamples, oneOf, OptionError, positiveNumber } from "@leeway/core";
import { mannKendall } from "./mann-kendall.js";
import { normalQuantile } from "./normal-quantile.js";
import { confidenceOption, senSlopeInterval } from "./sen-slope-interval.js";

/** The fewest values {@link timeToLimit} estimates from (each half of the window is tested on its own). */
export const TIME_TO_LIMIT_MIN_N = 10;

/** Options of {@link timeToLimit}. */
export interface TimeToLimitOptions {
  /** The limit L the user sets, in the units of the values (a finite number). */
  limit: number;
  /** Two-sided confidence level of the crossing-time interval, in (0, 1) (default 0.9); the trend tests use α = 1 − confidence. */
  confidence?: number;
  /** Time between two values of the series, in the unit the answer should have (> 0, default 1: answers in steps). */
  step?: number;
  /** `"above"` (default): the limit is reached when the values rise to it or past it; `"below"`: when they fall to it or below. */
  side?: "above" | "below";
}

/** Why {@link timeToLimit} gave no crossing time. */
export type TimeToLimitRefusal = "too-few-values" | "no-significant-trend" | "not-monotone" | "moving-away";

/** What {@link timeToLimit} returns: an estimate, "already reached", or a refusal with its reason. */
export type TimeToLimit = TimeToLimitEstimate | TimeToLimitReached | TimeToLimitRefused;

/** The fitted line of a window: slope, its interval, the level at the last value. */
export interface TrendLine {
  /** Theil–Sen slope, per unit of `step`. */
  slope: number;
  /** Sen's interval for the slope at the confidence level, per unit of `step`. */
  slopeLower: number;
  slopeUpper: number;
  /** The line's level at the last value of the series. */
  level: number;
  /** Mann–Kendall two-sided p-value of the whole window. */
  pValue: number;
}

/** The limit lies ahead and the trend runs towards it. */
export interface TimeToLimitEstimate extends TrendLine {
  status: "estimated";
  limit: number;
  confidence: number;
  /** Time from the last value until the line reaches the limit, in units of `step`. */
  expected: number;
  /** The interval for that time at the confidence level (earliest is 0 when the limit may already be reached). */
  earliest: number;
  latest: number;
}

/** The line is already at or past the limit. */
export interface TimeToLimitReached extends TrendLine {
  status: "reached";
  limit: number;
  confidence: number;
}

/** No estimate, and why. */
export interface TimeToLimitRefused {
  status: "refused";
  limit: number;
  confidence: number;
  reason: TimeToLimitRefusal;
  /** One sentence for a person. */
  detail: string;
  /** Mann–Kendall two-sided p-value of the whole window (NaN below two values). */
  pValue: number;
}

/**
 * When a trending series will reach a limit the user sets, with an interval.
 *
 * Method: the line through the window is the Theil–Sen slope b with Sen's distribution-free
 * interval (Sen, 1968; see {@link senSlopeInterval}) and the level y_c at the window's centre
 * t_c, the median of the detrended values x_i − b·(i − t_c), with the sign-test interval of a
 * median (Hollander & Wolfe, 1999, §3.6). Their half-widths give standard errors s_b and s_c, and
 * the crossing D = (L − y_c)/b from the centre gets Fieller's interval for a ratio (Fieller,
 * 1954): the D with (L − y_c − b·D)² ≤ z²·(s_c² + D²·s_b²), z = Φ⁻¹((1 + confidence)/2).
 *
 * It refuses, naming the reason, when the window has fewer than {@link TIME_TO_LIMIT_MIN_N} values;
 * when the Mann–Kendall test (Mann, 1945; Kendall, 1975) finds no trend at α = 1 − confidence or
 * the Fieller set is unbounded (the slope is not clearly away from 0); when one half of the window
 * has a significant trend against the whole window's direction (not monotone); and when the trend
 * runs away from the limit. A line already at or past the limit (on its `side`) is `"reached"`. A straight line is assumed: for a trend that accelerates the estimate
 * is late, and it says so nowhere else.
 *
 * @example
 * const rising = Array.from({ length: 40 }, (_, i) => 2 + 0.05 * i + 0.02 * Math.sin(7 * i));
 * const t = timeToLimit(rising, { limit: 5, step: 1 });
 * t.status === "estimated" ? [t.expected.toFixed(1), t.earliest.toFixed(1), t.latest.toFixed(1)] : t.status; // ["21.0", "20.7", "21.3"]
 */
export function timeToLimit(values: ArrayLike<number>, options: TimeToLimitOptions): TimeToLimit {
  const C = "timeToLimit";
  if (options === null || typeof options !== "object") throw new OptionError(C, "options", options, "an options object with a limit");
  const limit = finiteNumber(C, "limit", options.limit);
  const confidence = confidenceOption(C, options);
  const step = options.step === undefined ? 1 : positiveNumber(C, "step", options.step);
  const above = (options.side === undefined ? "above" : oneOf(C, "side", options.side, ["above", "below"] as const)) === "above";
  const xs = finiteSamples(C, "values", values);
  const n = xs.length;
  const alpha = 1 - confidence;
  const refuse = (reason: TimeToLimitRefusal, detail: string, pValue: number): TimeToLimitRefused => ({ status: "refused", limit, confidence, reason, detail, pValue });
  if (n < TIME_TO_LIMIT_MIN_N) return refuse("too-few-values", `${n} values in the window; at least ${TIME_TO_LIMIT_MIN_N} are needed`, n < 2 ? Number.NaN : mannKendall(xs).pValue);
  const whole = mannKendall(xs);
  if (!(whole.pValue <= alpha)) return refuse("no-significant-trend", `the Mann-Kendall test finds no trend (p = ${formatP(whole.pValue)} > ${formatP(alpha)})`, whole.pValue);
  const rising = whole.s > 0;
  const half = n >> 1;
  for (const part of [xs.subarray(0, half), xs.subarray(n - half)]) {
    const mk = mannKendall(part);
    if (mk.pValue <= alpha && mk.s > 0 !== rising) {
      return refuse("not-monotone", `one half of the window trends ${rising ? "down" : "up"} (p = ${formatP(mk.pValue)}) while the whole trends ${rising ? "up" : "down"}`, whole.pValue);
    }
  }
  const sen = senSlopeInterval(xs, { confidence });
  const z = normalQuantile(0.5 + confidence / 2);
  const centre = (n - 1) / 2;
  const b = sen.slope;
  const { level: yc, halfWidth: levelHalfWidth } = centreLevel(xs, b, centre, z);
  const lastLevel = yc + b * (n - 1 - centre);
  const line: TrendLine = { slope: b / step, slopeLower: sen.lower / step, slopeUpper: sen.upper / step, level: lastLevel, pValue: whole.pValue };
  if (above ? lastLevel >= limit : lastLevel <= limit) return { status: "reached", limit, confidence, ...line };
  if (above ? !rising || b <= 0 : rising || b >= 0) {
    return refuse("moving-away", `the level ${lastLevel.toPrecision(4)} moves away from the limit ${limit} it should reach from ${above ? "below" : "above"}`, whole.pValue);
  }
  // Fieller: A·D² − 2·B·D + K ≤ 0 with A = b² − z²s_b², B = Δ·b, K = Δ² − z²s_c², Δ = L − y_c.
  const sb = (sen.upper - sen.lower) / (2 * z);
  const sc = levelHalfWidth / z;
  const delta = limit - yc;
  const A = b * b - z * z * sb * sb;
  const B = delta * b;
  const K = delta * delta - z * z * sc * sc;
  const disc = B * B - A * K;
  if (!(A > 0) || !(disc >= 0)) {
    return refuse("no-significant-trend", `the slope interval [${sen.lower.toPrecision(3)}, ${sen.upper.toPrecision(3)}] per step is too wide to bound the crossing`, whole.pValue);
  }
  const root = Math.sqrt(disc);
  const toNow = (d: number): number => ((d - (n - 1 - centre)) * step);
  return {
    status: "estimated",
    limit,
    confidence,
    ...line,
    expected: toNow(delta / b),
    earliest: Math.max(0, toNow((B - root) / A)),
    latest: toNow((B + root) / A),
  };
}

/**
 * The level at the centre: the median of x_i − b·(i − t_c), and the half-width of the
 * sign-test interval for it (order statistics n/2 ± z·√n/2, interpolated).
 */
function centreLevel(xs: Float64Array, b: number, centre: number, z: number): { level: number; halfWidth: number } {
  const n = xs.length;
  const r = new Float64Array(n);
  for (let i = 0; i < n; i++) r[i] = (xs[i] as number) - b * (i - centre);
  r.sort();
  const at = (rank0: number): number => {
    const k = Math.min(n - 1, Math.max(0, rank0));
    const lo = Math.floor(k);
    const f = k - lo;
    return f === 0 ? (r[lo] as number) : (r[lo] as number) + f * ((r[lo + 1] as number) - (r[lo] as number));
  };
  const mid = (n - 1) / 2;
  const spread = (z * Math.sqrt(n)) / 2;
  return { level: at(mid), halfWidth: (at(mid + spread) - at(mid - spread)) / 2 };
}

function formatP(p: number): string {
  return p < 1e-3 ? p.toExponential(1) : p.toFixed(3);
}
