import type { QualityPolicy } from "./quality-run.js";
import type { QualityKind, QualityRate } from "./quality-scenarios.js";
import type { QualityRow } from "./quality-table.js";

/** The numeric fields of a {@link QualityRow}. */
export type QualityField = {
  [K in keyof QualityRow]: QualityRow[K] extends number | null ? K : never;
}[keyof QualityRow];

/**
 * One target of the engine on the suite, as plain data: `field` of the
 * engine's row for `kind` must satisfy `op` against `value` — or, with
 * `against`, against `value` × the same field of that policy's row.
 */
export interface QualityTarget {
  /** Stable identifier, for assertions (`"degradation-learnt-after-warning"`). */
  id: string;
  kind: QualityKind;
  /** What is measured, in words. */
  metric: string;
  field: QualityField;
  op: "<=" | ">=" | "<";
  value: number;
  against?: QualityPolicy;
  /** Added to both figures before an `against` comparison (1 turns delays into samples seen up to the reaction, so that a delay of 0 is not an unreachable bound). */
  offset?: number;
  /** The target in words. */
  target: string;
}

const SHIFTS: readonly QualityKind[] = ["abrupt-shift", "gradual-shift", "gain-change"];

/** The engine's targets on the suite, one row each (metric, event kind, target). */
export const QUALITY_TARGETS: readonly QualityTarget[] = Object.freeze([
  { id: "degradation-alarmed-before-half", kind: "degradation", metric: "share alarmed as degradation before severity 0.5", field: "degradationAlarmedBeforeHalf", op: ">=", value: 1, target: "100 %" },
  { id: "degradation-median-severity", kind: "degradation", metric: "median severity at the degradation alarm", field: "medianDegradationAlarmSeverity", op: "<=", value: 0.25, target: "≤ 0.25" },
  { id: "degradation-learnt-after-warning", kind: "degradation", metric: "samples learnt after the first degradation warning (largest per event)", field: "maxLearntAfterWarning", op: "<=", value: 0, target: "0" },
  { id: "degradation-one-alarm", kind: "degradation", metric: "alarms per event", field: "alarmsPerEvent", op: "<=", value: 1, target: "≤ 1 (plus spaced reminders, once the engine has them)" },
  { id: "degradation-beats-always-adapt", kind: "degradation", metric: "samples learnt during degradation (mean per event)", field: "learntDuringDegradation", op: "<", value: 1, against: "always adapt", target: "< always adapt's" },
  { id: "fault-alarmed-within-5", kind: "fault", metric: "share alarmed as anomaly within 5 samples", field: "faultsAlarmedWithin5", op: ">=", value: 1, target: "100 %" },
  { id: "fault-never-learnt", kind: "fault", metric: "samples learnt during a fault (largest per event)", field: "maxLearntDuringFault", op: "<=", value: 0, target: "0" },
  { id: "fault-never-retrained", kind: "fault", metric: "retrains and switches per event", field: "adaptationsPerEvent", op: "<=", value: 0, target: "0" },
  { id: "fault-one-alarm", kind: "fault", metric: "alarms per event", field: "alarmsPerEvent", op: "<=", value: 1, target: "≤ 1 (plus spaced reminders, once the engine has them)" },
  { id: "fault-delay-vs-cusum", kind: "fault", metric: "median reaction delay + 1 (samples seen up to the first decision that is not normal: learning stops and the cause is named)", field: "medianReactionDelay", op: "<=", value: 2, against: "onset CUSUM", offset: 1, target: "≤ 2 × the onset-tuned CUSUM's" },
  ...SHIFTS.flatMap((kind): QualityTarget[] => [
    { id: `${kind}-absorbed-once`, kind, metric: "share absorbed by exactly one retrain or switch, ≤ 1 page, no degradation alarm", field: "absorbedOnce", op: ">=", value: 0.95, target: "≥ 95 %" },
    { id: `${kind}-pages`, kind, metric: "operator pages (largest per event)", field: "maxPagesPerEvent", op: "<=", value: 1, target: "≤ 1" },
    { id: `${kind}-no-degradation-alarm`, kind, metric: "degradation alarms per event", field: "degradationAlarmsPerEvent", op: "<=", value: 0, target: "0" },
    { id: `${kind}-beats-frozen-only`, kind, metric: "operator pages per event", field: "pagesPerEvent", op: "<", value: 1, against: "frozen only", target: "< frozen only's" },
  ]),
  { id: "abrupt-shift-delay-vs-cusum", kind: "abrupt-shift", metric: "median reaction delay + 1 (samples seen up to the first decision that is not normal: learning stops and the cause is named)", field: "medianReactionDelay", op: "<=", value: 2, against: "onset CUSUM", offset: 1, target: "≤ 2 × the onset-tuned CUSUM's" },
  { id: "recurring-modes-known-silent", kind: "recurring-modes", metric: "share of returns to a known mode switched without an alarm", field: "knownModeSilent", op: ">=", value: 1, target: "100 %" },
  { id: "quiet-false-alarms", kind: "quiet", metric: "false alarms per 10^5 samples", field: "falseAlarmsPer1e5", op: "<=", value: 1, target: "≤ 1" },
]);

/** A target checked on one rate's rows for one engine policy. */
export interface TargetCheck {
  target: QualityTarget;
  rate: QualityRate;
  policy: QualityPolicy;
  /** The engine's value (plus the target's offset), or null when the rows hold none. */
  actual: number | null;
  /** The bound it was held to (value, or value × the other policy's figure), or null when that figure is missing. */
  bound: number | null;
  /** True when met; false when missed or when either figure is missing. */
  met: boolean;
}

/**
 * Checks every target against a suite table for each engine policy (with an
 * operator and unattended) and each rate present in the rows.
 * @example
 * checkTargets([]); // [] (no rows, nothing to check)
 */
export function checkTargets(rows: readonly QualityRow[], targets: readonly QualityTarget[] = QUALITY_TARGETS): TargetCheck[] {
  const out: TargetCheck[] = [];
  const rates = [...new Set(rows.map((r) => r.rate))];
  const find = (kind: QualityKind, rate: QualityRate, policy: QualityPolicy): QualityRow | undefined => rows.find((r) => r.kind === kind && r.rate === rate && r.policy === policy);
  for (const target of targets) {
    for (const rate of rates) {
      for (const policy of ["engine, operator", "engine, unattended"] as const) {
        const row = find(target.kind, rate, policy);
        if (row === undefined) continue;
        const offset = target.offset ?? 0;
        const value = row[target.field];
        const actual = value === null ? null : value + offset;
        let bound: number | null = target.value;
        if (target.against !== undefined) {
          const other = find(target.kind, rate, target.against)?.[target.field] ?? null;
          bound = other === null ? null : target.value * (other + offset);
        }
        const met = actual !== null && bound !== null && (target.op === "<=" ? actual <= bound : target.op === ">=" ? actual >= bound : actual < bound);
        out.push({ target, rate, policy, actual, bound, met });
      }
    }
  }
  return out;
}
