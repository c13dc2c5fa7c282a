/** A mapping from data values to SVG y coordinates (top = high values). */
export interface YScale {
  y(value: number): number;
  ticks: { value: number; label: string }[];
  log: boolean;
}

/**
 * "Nice" tick values covering [low, high]: steps of 1, 2 or 5 × 10^k, about
 * `count` of them (Heckbert, 1990, "Nice numbers for graph labels").
 * @example
 * niceTicks(0, 9.3, 5); // [0, 2, 4, 6, 8, 10]
 */
export function niceTicks(low: number, high: number, count: number): number[] {
  if (!(high > low)) return [low];
  const raw = (high - low) / Math.max(1, count);
  const magnitude = 10 ** Math.floor(Math.log10(raw));
  const fraction = raw / magnitude;
  const step = (fraction <= 1 ? 1 : fraction <= 2 ? 2 : fraction <= 5 ? 5 : 10) * magnitude;
  const first = Math.floor(low / step) * step;
  const ticks: number[] = [];
  for (let k = 0; k < 50; k++) {
    const v = first + k * step;
    ticks.push(Math.abs(v) < step * 1e-9 ? 0 : v);
    if (v >= high - step * 1e-9) break; // the last tick reaches high
  }
  return ticks;
}

/** A short label for a tick or table value (3 significant digits, k/M for large counts). */
export function formatNumber(v: number): string {
  if (!Number.isFinite(v)) return String(v);
  const a = Math.abs(v);
  if (a === 0) return "0";
  if (Number.isInteger(v) && a < 1e4) return String(v);
  if (a >= 1e9) return v.toExponential(2).replace("e+", "e");
  if (a >= 1e6) return `${trim((v / 1e6).toPrecision(3))}M`;
  if (a >= 1e4) return `${trim((v / 1e3).toPrecision(3))}k`;
  if (a >= 1e3) return String(Math.round(v));
  if (a >= 1e-3) return trim(v.toPrecision(3));
  return v.toExponential(1).replace("e+", "e");
}

function trim(text: string): string {
  return text.includes(".") && !text.includes("e") ? text.replace(/\.?0+$/, "") : text;
}

/**
 * A y scale for values in [low, high] drawn between pixel rows `top` and
 * `bottom`. Positive data is drawn on a log
 * scale when they span more than a factor 30 (score spikes of an anomaly would flatten everything else).
 */
export function yScale(low: number, high: number, top: number, bottom: number, allowLog = true): YScale {
  if (!Number.isFinite(low) || !Number.isFinite(high)) {
    low = 0;
    high = 1;
  }
  if (allowLog && low > 0 && high / low > 30) {
    const a = Math.floor(Math.log10(low));
    const b = Math.ceil(Math.log10(high));
    const ticks: { value: number; label: string }[] = [];
    const stride = Math.max(1, Math.ceil((b - a) / 6));
    for (let k = a; k <= b; k += stride) ticks.push({ value: 10 ** k, label: formatNumber(10 ** k) });
    return {
      y: (v) => bottom - ((Math.log10(Math.max(v, 10 ** a)) - a) / Math.max(1e-12, b - a)) * (bottom - top),
      ticks,
      log: true,
    };
  }
  if (high === low) {
    const pad = Math.abs(high) > 0 ? Math.abs(high) * 0.1 : 1;
    low -= pad;
    high += pad;
  }
  const values = niceTicks(low, high, 5);
  const lo = Math.min(low, values[0] as number);
  const hi = Math.max(high, values[values.length - 1] as number);
  return {
    y: (v) => bottom - ((v - lo) / (hi - lo)) * (bottom - top),
    ticks: values.map((value) => ({ value, label: formatNumber(value) })),
    log: false,
  };
}

/** Escapes text for HTML and SVG content and attribute values. */
export function escapeXml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => (c === "&" ? "&amp;" : c === "<" ? "&lt;" : c === ">" ? "&gt;" : c === '"' ? "&quot;" : "&#39;"));
}

/** A coordinate rounded to 0.1 px, as short as it prints. */
export function px(v: number): string {
  return String(Math.round(v * 10) / 10);
}
