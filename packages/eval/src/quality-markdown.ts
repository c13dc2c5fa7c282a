import { QUALITY_KINDS, type QualityKind } from "./quality-scenarios.js";
import type { QualityRow } from "./quality-table.js";
import type { TargetCheck } from "./quality-targets.js";

/** What the decision-quality document says about its run, besides the tables. */
export interface QualityRunNotes {
  /** A title line, for example "before the rule rewrite". */
  title: string;
  scenarios: number;
  samples: number;
  /** Free text placed after the title (how it was run, how long it took). */
  preamble: string;
  /** File name of the plot, linked from the document (written next to it). */
  plot: string | null;
}

interface Column {
  head: string;
  cell(r: QualityRow): string;
  /** Shown only when some row has a value. */
  value(r: QualityRow): number | null;
}

const pct = (x: number | null): string => (x === null ? "—" : `${(100 * x).toFixed(0)} %`);
const num = (x: number | null, digits = 1): string => (x === null ? "—" : Number.isInteger(x) ? String(x) : x.toFixed(digits));
const col = (head: string, value: (r: QualityRow) => number | null, format: (x: number | null) => string): Column => ({ head, value, cell: (r) => format(value(r)) });

const COLUMNS: readonly Column[] = [
  col("detected", (r) => r.detectionRate, pct),
  col("right cause", (r) => r.rightCauseRate, pct),
  col("median delay", (r) => r.medianDelay, (x) => num(x, 0)),
  col("median reaction", (r) => r.medianReactionDelay, (x) => num(x, 0)),
  col("p90 delay", (r) => r.p90Delay, (x) => num(x, 0)),
  col("learnt in degradation", (r) => r.learntDuringDegradation, (x) => num(x, 0)),
  col("learnt after warning (max)", (r) => r.maxLearntAfterWarning, (x) => num(x, 0)),
  col("degr. alarm < 0.5", (r) => r.degradationAlarmedBeforeHalf, pct),
  col("severity at degr. alarm (median)", (r) => r.medianDegradationAlarmSeverity, (x) => num(x, 2)),
  col("anomaly ≤ 5 samples", (r) => r.faultsAlarmedWithin5, pct),
  col("learnt in fault (max)", (r) => r.maxLearntDuringFault, (x) => num(x, 0)),
  col("false alarms / 10⁵", (r) => r.falseAlarmsPer1e5, (x) => num(x, 1)),
  col("alarms / event", (r) => r.alarmsPerEvent, (x) => num(x, 2)),
  col("pages / event", (r) => r.pagesPerEvent, (x) => num(x, 2)),
  col("retrains+switches / event", (r) => r.adaptationsPerEvent, (x) => num(x, 2)),
  col("absorbed once", (r) => r.absorbedOnce, pct),
  col("known mode, no alarm", (r) => r.knownModeSilent, pct),
];

const KIND_TITLES: Record<QualityKind, string> = {
  "abrupt-shift": "Abrupt environment shifts (noise floor ×1.3 to ×3; concept drift, to be absorbed)",
  "gradual-shift": "Gradual environment shifts (noise floor ×2, ×3 ramped in; concept drift)",
  "gain-change": "Sensor gain changes (re-mount, gain ×0.7 to ×2; concept drift)",
  "recurring-modes": "Recurring operating modes (990, 1485, 2970 rpm; returns to known modes)",
  degradation: "Slow degradation (bearing defect, exponential and linear growth, several spans)",
  fault: "Abrupt faults (clog, looseness, impacts; several lengths)",
  quiet: "Long quiet streams (no event)",
};

/**
 * The decision-quality document in Markdown: for each event kind a table of
 * every policy at both rates (columns without any value for the kind left
 * out), then the targets with the engine's values, met or missed.
 * @example
 * qualityMarkdown([], [], { title: "t", scenarios: 0, samples: 0, preamble: "", plot: null }).split("\n")[0]; // "# Decision quality: t"
 */
export function qualityMarkdown(rows: readonly QualityRow[], checks: readonly TargetCheck[], notes: QualityRunNotes): string {
  const out: string[] = [`# Decision quality: ${notes.title}`, ""];
  if (notes.preamble.length > 0) out.push(notes.preamble, "");
  out.push(`${notes.scenarios} scenarios, ${notes.samples.toLocaleString("en-US")} samples per policy.`, "");
  if (notes.plot !== null) out.push(`![Right-cause rate and operator pages per event, by event kind and policy](${notes.plot})`, "");
  for (const kind of QUALITY_KINDS) {
    const own = rows.filter((r) => r.kind === kind);
    if (own.length === 0) continue;
    const columns = COLUMNS.filter((c) => own.some((r) => c.value(r) !== null));
    out.push(`## ${KIND_TITLES[kind]}`, "");
    out.push(`| rate | policy | scenarios | events | ${columns.map((c) => c.head).join(" | ")} |`);
    out.push(`|---|---|---:|---:|${columns.map(() => "---:").join("|")}|`);
    for (const r of own) out.push(`| ${r.rate} | ${r.policy} | ${r.scenarios} | ${r.events} | ${columns.map((c) => c.cell(r)).join(" | ")} |`);
    out.push("");
  }
  if (checks.length > 0) {
    out.push("## Targets", "", "| target | kind | metric | target value | rate | engine | value | bound | met |", "|---|---|---|---|---|---|---:|---:|:-:|");
    for (const c of checks) {
      out.push(`| ${c.target.id} | ${c.target.kind} | ${c.target.metric} | ${c.target.target} | ${c.rate} | ${c.policy.replace("engine, ", "")} | ${num(c.actual, 3)} | ${num(c.bound, 3)} | ${c.met ? "yes" : "**no**"} |`);
    }
    out.push("");
  }
  return out.join("\n");
}
