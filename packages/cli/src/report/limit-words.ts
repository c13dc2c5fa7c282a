import type { LimitDecisionEvidence } from "@leeway/policy";
import type { AxisSpan } from "./plots.js";
import { formatNumber } from "./scale.js";
import { formatDuration } from "./time-axis.js";

/** Seconds per sample on the report's axis, or null on a sample axis. */
function secondsPerSample(axis: AxisSpan): number | null {
  if (axis.basis.kind === "samples") return null;
  return (axis.basis.secondsAt(axis.span - 1) - axis.basis.secondsAt(0)) / Math.max(1, axis.span - 1);
}

/** True when `value` is the engine's `evidence.limit` (a time-to-limit answer). */
export function isLimitEvidence(value: unknown): value is LimitDecisionEvidence {
  if (typeof value !== "object" || value === null) return false;
  const v = value as Record<string, unknown>;
  return typeof v.limit === "number" && (v.status === "estimated" || v.status === "reached" || v.status === "refused");
}

/**
 * The engine's time to the user's limit in one sentence for the report's
 * headline: "limit 0.25 (score) reached in ≈ 9.7 h to 1.1 d at the current rate
 * (expected ≈ 14 h; 3,480 to 9,520 samples)", "… reached already at the current
 * rate", or why there is no time. Times come from the engine's seconds when it
 * knew its sample period, else from the report's time axis.
 * @example
 * limitSentence({ status: "refused", limit: 2, limitSigma: 9, confidence: 0.9, pValue: 0.2, reason: "no-significant-trend", detail: "no trend", slopeLower: null, slopeUpper: null, seconds: null }, null);
 * // "limit 2 (score): no time estimated — no trend"
 */
export function limitSentence(e: LimitDecisionEvidence, axis: AxisSpan | null): string {
  const head = `limit ${formatNumber(e.limit)} (score)`;
  if (e.status === "refused") return `${head}: no time estimated — ${e.detail}`;
  if (e.status === "reached") return `${head} reached already at the current rate`;
  const perSample = e.seconds !== null ? 1 : axis === null ? null : secondsPerSample(axis);
  const samples = `${formatNumber(Math.round(e.earliest))} to ${formatNumber(Math.round(e.latest))} samples`;
  const interval = `${Math.round(100 * e.confidence)} % interval`;
  if (perSample === null) return `${head} reached in ${samples} at the current rate (expected ${formatNumber(Math.round(e.expected))}; ${interval})`;
  const t = e.seconds ?? { expected: e.expected * perSample, earliest: e.earliest * perSample, latest: e.latest * perSample };
  return `${head} reached in ${formatDuration(t.earliest)} to ${formatDuration(t.latest)} at the current rate (expected ${formatDuration(t.expected)}; ${interval}, ${samples})`;
}
