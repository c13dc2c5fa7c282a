import type { EventCause } from "./labels.js";
import type { ResponseClass } from "./metrics.js";

/** The metrics of one policy over some scenarios, pooled (one row of the table). */
export interface ComparisonRow {
  policy: string;
  /** Scenario names pooled into the row (one for a per-scenario row). */
  scenarios: string[];
  samples: number;
  events: number;
  detected: number;
  /** Detected events whose response claimed the true cause. */
  correctCause: number;
  missed: number;
  /** Missed events by true cause (a silently absorbed drift may be fine; a missed fault never is). */
  missedByCause: Record<EventCause, number>;
  /** Detected events whose wrong first claim was later revised to the true cause. */
  revisions: number;
  /** Over every detected event of the pooled scenarios, in samples; null with none detected. */
  meanDelay: number | null;
  medianDelay: number | null;
  falseAlarms: number;
  /** In-control samples, pooled. */
  exposure: number;
  falseAlarmsPer10k: number | null;
  /** Pooled in-control ARL, exposure / false alarms; null with no false alarm. */
  arl: number | null;
  arlLower: number;
  /** Null when unbounded (no false alarm). */
  arlUpper: number | null;
  retrains: number;
  retrainsByTruth: Record<ResponseClass, number>;
  modeSwitches: number;
  /** Samples learnt during degradation and anomaly events. */
  learnedDuringFaults: number;
  /** Mean over the scenarios that have anomaly labels of both classes, of the reference score's area (the live score's when no reference was given); null when none. */
  rocAuc: number | null;
  prAuc: number | null;
}

interface Column {
  header: string;
  cell(row: ComparisonRow): string;
}

const DASH = "–";

const COLUMNS: readonly Column[] = [
  { header: "policy", cell: (r) => escapeCell(r.policy) },
  { header: "events", cell: (r) => String(r.events) },
  { header: "detected", cell: (r) => String(r.detected) },
  { header: "right cause", cell: (r) => String(r.correctCause) },
  { header: "revised", cell: (r) => String(r.revisions) },
  { header: "missed d/g/a", cell: (r) => `${r.missed} (${r.missedByCause["concept-drift"]}/${r.missedByCause.degradation}/${r.missedByCause.anomaly})` },
  { header: "mean delay", cell: (r) => fixed(r.meanDelay, 1) },
  { header: "median delay", cell: (r) => fixed(r.medianDelay, 1) },
  { header: "false alarms", cell: (r) => String(r.falseAlarms) },
  { header: "per 10^4", cell: (r) => fixed(r.falseAlarmsPer10k, 2) },
  { header: "ARL0 (CI)", cell: arlCell },
  { header: "retrains d/g/a/n", cell: (r) => `${r.retrains} (${r.retrainsByTruth["concept-drift"]}/${r.retrainsByTruth.degradation}/${r.retrainsByTruth.anomaly}/${r.retrainsByTruth.none})` },
  { header: "switches", cell: (r) => String(r.modeSwitches) },
  { header: "learnt in faults", cell: (r) => String(r.learnedDuringFaults) },
  { header: "ROC AUC", cell: (r) => fixed(r.rocAuc, 3) },
  { header: "PR AUC", cell: (r) => fixed(r.prAuc, 3) },
];

/**
 * Renders comparison rows as a Markdown table: the pooled rows, then (when
 * given) one row per policy and scenario. Missed events are split by their
 * cause (concept drift / degradation / anomaly), retrains by the truth at the
 * time (concept drift / degradation / anomaly / none). "–" marks a value
 * that is not defined (no detection, no false alarm, no anomaly labels).
 */
export function comparisonMarkdown(rows: readonly ComparisonRow[], perScenario: readonly ComparisonRow[] = []): string {
  const parts = [table(COLUMNS, rows)];
  if (perScenario.length > 0) {
    const withScenario: Column[] = [COLUMNS[0] as Column, { header: "scenario", cell: (r) => escapeCell(r.scenarios.join(", ")) }, ...COLUMNS.slice(1)];
    parts.push(table(withScenario, perScenario));
  }
  return parts.join("\n");
}

function table(columns: readonly Column[], rows: readonly ComparisonRow[]): string {
  const lines = [`| ${columns.map((c) => c.header).join(" | ")} |`, `|${columns.map((c, i) => (i === 0 || c.header === "scenario" ? "---|" : "---:|")).join("")}`];
  for (const row of rows) lines.push(`| ${columns.map((c) => c.cell(row)).join(" | ")} |`);
  return lines.join("\n") + "\n";
}

function arlCell(r: ComparisonRow): string {
  const upper = r.arlUpper === null ? "∞" : r.arlUpper.toFixed(0);
  const interval = `${r.arlLower.toFixed(0)}–${upper}`;
  return r.arl === null ? `${DASH} (≥ ${r.arlLower.toFixed(0)})` : `${r.arl.toFixed(0)} (${interval})`;
}

function fixed(value: number | null, digits: number): string {
  return value === null ? DASH : value.toFixed(digits);
}

function escapeCell(text: string): string {
  return text.replace(/\|/g, "\\|");
}
