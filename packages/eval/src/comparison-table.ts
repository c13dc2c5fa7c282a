import type { ComparisonRow } from "./compare.js";

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
