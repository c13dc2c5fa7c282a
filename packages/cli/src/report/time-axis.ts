/**
 * Wall-clock time along a report's x axis: from the input's time column
 * (ISO 8601 dates, or numbers of seconds), or from a sample period, or, when
 * neither is known, the sample number.
 */

/** How times along the axis are known and shown. */
export interface TimeBasis {
  /**
   * `"clock"`: dates (ms since 1970, shown as "03-02 10:04");
   * `"elapsed"`: seconds from the record's start (shown as "day 2 10:04");
   * `"samples"`: no time known (shown as sample numbers).
   */
  kind: "clock" | "elapsed" | "samples";
  /** Index → time in seconds (clock: seconds since 1970), by linear interpolation between known points. */
  secondsAt(index: number): number;
  /** Index of a time (the inverse of secondsAt, on a monotone record). */
  indexAt(seconds: number): number;
}

/** Reads a time value: an ISO 8601 date (→ clock seconds) or a number of seconds; null when unreadable. */
export function timeSeconds(value: string | number | null): { seconds: number; clock: boolean } | null {
  if (typeof value === "number") return Number.isFinite(value) ? { seconds: value, clock: value > 1e9 } : null;
  if (typeof value === "string") {
    if (!/^\d{4}-\d\d-\d\d/.test(value)) {
      const n = Number(value);
      return value.trim() !== "" && Number.isFinite(n) ? { seconds: n, clock: n > 1e9 } : null;
    }
    const ms = Date.parse(/[zZ]|[+-]\d\d:?\d\d$/.test(value) || value.length <= 10 ? value : `${value}Z`);
    return Number.isFinite(ms) ? { seconds: ms / 1000, clock: true } : null;
  }
  return null;
}

/**
 * The time basis of a record from (index, time) points (the first sample of
 * each drawn column and the last sample), or from a sample period in
 * seconds; the points must rise with the index, or the time is not used.
 * @example
 * timeBasis([[0, "2026-03-02T00:00:00Z"], [360, "2026-03-02T01:00:00Z"]], null).kind; // "clock"
 * timeBasis([], 10).secondsAt(8640); // 86400 (day 2 00:00)
 */
export function timeBasis(points: readonly [number, string | number | null][], samplePeriod: number | null): TimeBasis {
  const xs: number[] = [];
  const ts: number[] = [];
  let clock: boolean | null = null;
  for (const [index, value] of points) {
    const t = timeSeconds(value);
    if (t === null || (clock !== null && t.clock !== clock)) {
      xs.length = 0;
      break;
    }
    clock = t.clock;
    if (xs.length > 0 && (index <= (xs[xs.length - 1] as number) || t.seconds < (ts[ts.length - 1] as number))) {
      xs.length = 0;
      break;
    }
    xs.push(index);
    ts.push(t.seconds);
  }
  if (xs.length >= 2) return interpolated(clock === true ? "clock" : "elapsed", xs, ts);
  if (samplePeriod !== null && samplePeriod > 0) return interpolated("elapsed", [0, 1], [0, samplePeriod]);
  return interpolated("samples", [0, 1], [0, 1]);
}

function interpolated(kind: TimeBasis["kind"], xs: readonly number[], ts: readonly number[]): TimeBasis {
  const last = xs.length - 1;
  const segment = (arr: readonly number[], v: number): number => {
    // the k with arr[k] <= v < arr[k + 1], clamped to the first and last segment
    let lo = 0;
    let hi = last;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if ((arr[mid] as number) <= v) lo = mid;
      else hi = mid;
    }
    return Math.min(lo, last - 1);
  };
  const lerp = (from: readonly number[], to: readonly number[], v: number): number => {
    const k = segment(from, v);
    const f0 = from[k] as number;
    const f1 = from[k + 1] as number;
    const t0 = to[k] as number;
    const t1 = to[k + 1] as number;
    return f1 === f0 ? t0 : t0 + ((v - f0) / (f1 - f0)) * (t1 - t0);
  };
  return { kind, secondsAt: (i) => lerp(xs, ts, i), indexAt: (s) => lerp(ts, xs, s) };
}

const STEPS = [1, 2, 5, 10, 15, 30, 60, 120, 300, 600, 900, 1800, 3600, 7200, 10800, 21600, 43200, 86400, 172800, 604800, 1209600, 2592000];

/**
 * Tick times for a span of `from`..`to` seconds, about `count` of them, at
 * round steps (seconds, minutes, hours, days, weeks).
 */
export function timeTicks(from: number, to: number, count: number): number[] {
  if (!(to > from)) return [from];
  const raw = (to - from) / Math.max(1, count);
  const step = STEPS.find((s) => s >= raw) ?? Math.ceil(raw / 2592000) * 2592000;
  const ticks: number[] = [];
  for (let t = Math.ceil(from / step) * step; t <= to + 1e-9 && ticks.length < 60; t += step) ticks.push(t);
  return ticks;
}

const pad = (n: number): string => String(n).padStart(2, "0");

/**
 * A time as the axis and the tables show it: clock times as "2026-03-02 10:04"
 * (UTC), elapsed times as "day 2 10:04" (day 1 is the record's first), sample
 * numbers as "sample 1 200". Seconds are shown when `fine`.
 * @example
 * formatTime("elapsed", 34 * 3600 + 300, false); // "day 2 10:05"
 */
export function formatTime(kind: TimeBasis["kind"], seconds: number, fine: boolean): string {
  if (kind === "samples") return `sample ${Math.round(seconds).toLocaleString("en-US").replace(/,/g, " ")}`;
  if (kind === "clock") {
    const d = new Date(Math.round(seconds * 1000));
    const day = `${d.getUTCFullYear()}-${pad(d.getUTCMonth() + 1)}-${pad(d.getUTCDate())}`;
    return `${day} ${pad(d.getUTCHours())}:${pad(d.getUTCMinutes())}${fine ? `:${pad(d.getUTCSeconds())}` : ""}`;
  }
  const s = Math.round(seconds);
  const day = Math.floor(s / 86400) + 1;
  const rest = s - (day - 1) * 86400;
  return `day ${day} ${pad(Math.floor(rest / 3600))}:${pad(Math.floor((rest % 3600) / 60))}${fine ? `:${pad(rest % 60)}` : ""}`;
}

/**
 * A duration in words with its unit: "45 s", "12 min", "3.5 h", "2.1 days".
 * @example
 * formatDuration(5400); // "1.5 h"
 */
export function formatDuration(seconds: number): string {
  const a = Math.abs(seconds);
  const round = (v: number): string => (v >= 10 ? String(Math.round(v)) : String(Math.round(v * 10) / 10));
  if (a < 90) return `${round(seconds)} s`;
  if (a < 5400) return `${round(seconds / 60)} min`;
  if (a < 172800) return `${round(seconds / 3600)} h`;
  return `${round(seconds / 86400)} days`;
}
