import type { ReplayMetrics } from "@leeway/eval";
import { CAUSE_WORDS, METRIC_WORDS } from "./glossary.js";
import { samplesWithTime } from "./headline.js";
import type { AxisSpan, ReportEvent } from "./plots.js";
import { formatNumber } from "./scale.js";
import type { Table } from "./tables.js";
import { formatTime } from "./time-axis.js";

const CLASS_WORDS: Readonly<Record<string, string>> = { ...CAUSE_WORDS, none: "nothing" };

/**
 * The evaluation against the labels as tables in plain words, every delay
 * with its unit (samples and time): key figures, each labelled event and how
 * it was answered, and what the answers claimed against what happened.
 */
export function metricTables(m: ReplayMetrics, axis: AxisSpan, labelled: readonly ReportEvent[] = []): Table[] {
  const delay = (d: { mean: number; median: number; max: number } | null): string => (d === null ? "—" : `mean ${samplesWithTime(axis, d.mean)}, median ${formatNumber(d.median)}, longest ${formatNumber(d.max)} samples`);
  const key: Table = {
    caption: "Key figures",
    columns: ["figure", "value"],
    rows: [
      [METRIC_WORDS.samples as string, m.samples],
      [METRIC_WORDS.events as string, m.events],
      [METRIC_WORDS.detected as string, m.detected],
      [METRIC_WORDS.missed as string, m.missed],
      [METRIC_WORDS.correctCause as string, m.correctCause],
      ["detection delay", delay(m.delay)],
      ["samples learnt during a degradation", m.learnedDuring.degradation],
      ["samples learnt during an anomaly", m.learnedDuring.anomaly],
      [METRIC_WORDS.falseAlarms as string, m.falseAlarms],
      [METRIC_WORDS.falseAlarmsPer10k as string, m.falseAlarmsPer10k === null ? "—" : formatNumber(m.falseAlarmsPer10k)],
      ["average run between false alarms", m.runLengths.arl === null ? "no false alarm" : samplesWithTime(axis, m.runLengths.arl)],
      [METRIC_WORDS.repeats as string, m.repeats],
      [METRIC_WORDS.revisions as string, m.revisions],
      ["alarms / retrains / switches to a known mode", `${m.alarms.count} / ${m.retrains.count} / ${m.modeSwitches.count}`],
      ...(m.scores?.live ? ([["live score against the anomaly labels: ROC AUC / PR AUC", `${m.scores.live.rocAuc.toFixed(3)} / ${m.scores.live.prAuc.toFixed(3)}`]] as [string, string][]) : []),
    ],
  };
  const at = (i: number): string => formatTime(axis.basis.kind, axis.basis.secondsAt(i - axis.origin), false);
  const perEvent: Table = {
    caption: "Each labelled event",
    columns: ["event", "what happened", "started", "answered after", "answer claimed"],
    rows: m.perEvent.map((e) => [labelled.find((l) => l.id !== undefined && l.id === e.id)?.label ?? e.id ?? e.type ?? CAUSE_WORDS[e.cause], CAUSE_WORDS[e.cause], at(e.start), e.delay === null ? "missed" : samplesWithTime(axis, e.delay), e.delay === null ? "—" : `${CLASS_WORDS[e.claimed] ?? e.claimed}${e.correct ? "" : " (not the true cause)"}`]),
  };
  const classes = Object.keys(m.confusion);
  const columns = [...new Set(classes.flatMap((r) => Object.keys(m.confusion[r as keyof typeof m.confusion] ?? {})))];
  const confusion: Table = {
    caption: "What the answers claimed (columns) against what happened (rows)",
    columns: ["what happened", ...columns.map((c) => CLASS_WORDS[c] ?? c)],
    rows: classes.map((r) => [CLASS_WORDS[r] ?? r, ...columns.map((c) => (m.confusion[r as keyof typeof m.confusion] as Record<string, number> | undefined)?.[c] ?? 0)]),
  };
  return [key, perEvent, confusion];
}
