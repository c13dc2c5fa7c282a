import type { ReplayMetrics } from "@leeway/eval";
import { formatNumber } from "./report/scale.js";
import type { ReportTimeline } from "./report/timeline.js";

/** Routine decisions the printed timeline leaves out: learning or holding a normal sample, commissioning. */
function routine(action: string, cause: string): boolean {
  return (action === "learn" || action === "hold") && (cause === "normal" || cause === "commissioning");
}

/**
 * A short text timeline of the decisions that were not routine (alarms,
 * retrains, switches, holds for a cause), one line each, at most `limit`
 * lines; `label(index)` may add the sample's time or simulated clock.
 */
export function timelineText(t: ReportTimeline, limit = 24, label: (index: number, time: string | number | null) => string = (i) => `#${i}`): string {
  const notable = t.transitions.filter((d) => !routine(d.action, d.cause));
  const lines = notable.slice(0, limit).map((d) => `  ${label(d.index, d.time).padEnd(18)} ${d.mode === null ? "" : d.mode.padEnd(6)}${d.action.padEnd(18)} ${d.cause.padEnd(14)} ${d.phase.padEnd(13)} live ${formatNumber(d.liveScore)}`);
  if (notable.length > limit) lines.push(`  … ${notable.length - limit} more decision changes (see the report)`);
  if (t.transitionsOmitted > 0) lines.push(`  … and ${t.transitionsOmitted} changes beyond the ${t.transitions.length} kept`);
  if (lines.length === 0) lines.push("  (no alarm, retrain, mode switch or hold)");
  return lines.join("\n");
}

/** Counts of decisions by action, in one line. */
export function countsText(t: ReportTimeline): string {
  const byAction = new Map<string, number>();
  for (const c of t.counts) byAction.set(c.action, (byAction.get(c.action) ?? 0) + c.count);
  return [...byAction].map(([a, k]) => `${a} ${k}`).join(", ");
}

/** The headline metrics of a replay against labels, as an aligned text table. */
export function metricsText(m: ReplayMetrics): string {
  const rows: [string, string][] = [
    ["samples", String(m.samples)],
    ["labelled events", String(m.events)],
    ["detected / missed", `${m.detected} / ${m.missed}`],
    ["detected with the true cause", String(m.correctCause)],
    ["mean detection delay", m.delay === null ? "—" : `${formatNumber(m.delay.mean)} samples (median ${formatNumber(m.delay.median)}, max ${formatNumber(m.delay.max)})`],
    ["false alarms", `${m.falseAlarms}${m.falseAlarmsPer10k === null ? "" : ` (${formatNumber(m.falseAlarmsPer10k)} per 10^4 samples)`}`],
    ["alarms / retrains / mode switches", `${m.alarms.count} / ${m.retrains.count} / ${m.modeSwitches.count}`],
    ["samples learnt during degradation / anomaly", `${m.learnedDuring.degradation} / ${m.learnedDuring.anomaly}`],
  ];
  if (m.scores !== null && m.scores.live !== null) rows.push(["ROC AUC / PR AUC of the live score", `${m.scores.live.rocAuc.toFixed(3)} / ${m.scores.live.prAuc.toFixed(3)}`]);
  const lines = rows.map(([k, v]) => `  ${k.padEnd(44)} ${v}`);
  lines.push("", "  per event:");
  const modeChanges = m.perEvent.filter((e) => e.type === "mode-change");
  if (modeChanges.length > 0) {
    const answered = modeChanges.filter((e) => e.delay !== null).length;
    lines.push(`    ${"speed changes (mode-change)".padEnd(28)} ${"concept-drift".padEnd(14)} ${modeChanges.length} events, ${answered} answered (a known mode needs no answer)`);
  }
  for (const e of m.perEvent.filter((x) => x.type !== "mode-change")) {
    lines.push(`    ${(e.id ?? e.type ?? e.cause).padEnd(28)} ${e.cause.padEnd(14)} start ${String(e.start).padEnd(8)} ${e.delay === null ? "missed" : `answered after ${e.delay} samples, claimed ${e.claimed}${e.correct ? "" : " (wrong cause)"}`}`);
  }
  return lines.join("\n");
}
