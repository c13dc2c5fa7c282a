import { QUALITY_POLICIES, type EventOutcome, type QualityPolicy, type ScenarioOutcome } from "./quality-run.js";
import { QUALITY_KINDS, QUALITY_RATES, type QualityKind, type QualityRate } from "./quality-scenarios.js";

/**
 * The decision-quality metrics of one policy over the scenarios of one event
 * kind at one sample rate. Rates are shares of the events in [0, 1]; delays
 * and learnt samples are in samples; null where the kind has no such event
 * (or nothing to measure: no detection, no exposure).
 */
export interface QualityRow {
  kind: QualityKind;
  rate: QualityRate;
  policy: QualityPolicy;
  scenarios: number;
  events: number;
  samples: number;
  /** Share of events with a response in their attribution window. */
  detectionRate: number | null;
  /** Share of events whose first response claimed the true cause. */
  rightCauseRate: number | null;
  /** Median and 90th percentile (nearest rank) of the delays of detected events. */
  medianDelay: number | null;
  /** Median of the reaction delays (onset to the first decision whose cause is not "normal"). */
  medianReactionDelay: number | null;
  p90Delay: number | null;
  /** Degradation events: samples learnt during the event, mean and largest per event. */
  learntDuringDegradation: number | null;
  maxLearntDuringDegradation: number | null;
  /** Degradation events: samples learnt after the first degradation warning, mean and largest per event (events with a warning). */
  learntAfterWarning: number | null;
  maxLearntAfterWarning: number | null;
  /** Degradation events: share alarmed with cause "degradation" before severity 0.5, and the median severity at that alarm (1 for an event never so alarmed). */
  degradationAlarmedBeforeHalf: number | null;
  medianDegradationAlarmSeverity: number | null;
  /** Fault events: share alarmed as "anomaly" within 5 samples of the onset; largest number of samples learnt during one. */
  faultsAlarmedWithin5: number | null;
  maxLearntDuringFault: number | null;
  /** False alarms per 10^5 in-control samples (pooled), and their counts. */
  falseAlarmsPer1e5: number | null;
  falseAlarms: number;
  exposure: number;
  /** Per event: alarm episodes, operator pages (alarms + questions), retrains and switches; means, and the largest page count. */
  alarmsPerEvent: number | null;
  pagesPerEvent: number | null;
  maxPagesPerEvent: number | null;
  adaptationsPerEvent: number | null;
  /** Alarms with cause "degradation" per event (for benign events: should be 0). */
  degradationAlarmsPerEvent: number | null;
  /** Concept-drift events: share absorbed by exactly one retrain or switch, with at most one page and no degradation alarm. */
  absorbedOnce: number | null;
  /** Returns to a known mode: share switched to without an alarm. */
  knownModeSilent: number | null;
}

/**
 * Tabulates suite outcomes: one {@link QualityRow} per event kind, sample
 * rate and policy (kinds in {@link QUALITY_KINDS} order, then rates, then
 * {@link QUALITY_POLICIES}); combinations with no scenario are left out.
 * @example
 * qualityTable([]); // []
 */
export function qualityTable(outcomes: readonly ScenarioOutcome[]): QualityRow[] {
  const rows: QualityRow[] = [];
  for (const kind of QUALITY_KINDS) {
    for (const { rate } of QUALITY_RATES) {
      const scenarios = outcomes.filter((o) => o.kind === kind && o.rate === rate);
      if (scenarios.length === 0) continue;
      for (const policy of QUALITY_POLICIES) {
        const runs = scenarios.map((s) => s.policies.find((p) => p.policy === policy)).filter((p) => p !== undefined);
        rows.push(row(kind, rate, policy, scenarios.length, runs));
      }
    }
  }
  return rows;
}

function row(kind: QualityKind, rate: QualityRate, policy: QualityPolicy, scenarios: number, runs: readonly { samples: number; exposure: number; falseAlarms: number; events: EventOutcome[] }[]): QualityRow {
  const events = runs.flatMap((r) => r.events);
  const degradations = events.filter((e) => e.cause === "degradation");
  const faults = events.filter((e) => e.cause === "anomaly");
  const drifts = events.filter((e) => e.cause === "concept-drift");
  const known = events.filter((e) => e.knownMode);
  const warned = degradations.filter((e) => e.learntAfterWarning !== null);
  const reactions = events.map((e) => e.reactionDelay).filter((d): d is number => d !== null).sort((a, b) => a - b);
  const delays = events.map((e) => e.delay).filter((d): d is number => d !== null).sort((a, b) => a - b);
  // An event never alarmed as degradation counts as severity 1 (the severity its span ends at).
  const degradationSeverities = degradations.map((e) => e.degradationAlarmSeverity ?? 1).sort((a, b) => a - b);
  const falseAlarms = runs.reduce((s, r) => s + r.falseAlarms, 0);
  const exposure = runs.reduce((s, r) => s + r.exposure, 0);
  return {
    kind,
    rate,
    policy,
    scenarios,
    events: events.length,
    samples: runs.reduce((s, r) => s + r.samples, 0),
    detectionRate: share(events, (e) => e.detected),
    rightCauseRate: share(events, (e) => e.claimed === e.cause),
    medianDelay: quantile(delays, 0.5),
    p90Delay: quantile(delays, 0.9),
    medianReactionDelay: quantile(reactions, 0.5),
    learntDuringDegradation: mean(degradations, (e) => e.learnt),
    maxLearntDuringDegradation: largest(degradations, (e) => e.learnt),
    learntAfterWarning: mean(warned, (e) => e.learntAfterWarning as number),
    maxLearntAfterWarning: largest(warned, (e) => e.learntAfterWarning as number),
    degradationAlarmedBeforeHalf: share(degradations, (e) => e.degradationAlarmSeverity !== null && e.degradationAlarmSeverity < 0.5),
    medianDegradationAlarmSeverity: quantile(degradationSeverities, 0.5),
    faultsAlarmedWithin5: share(faults, (e) => e.claimed === "anomaly" && e.delay !== null && e.delay <= 5),
    maxLearntDuringFault: largest(faults, (e) => e.learnt),
    falseAlarmsPer1e5: exposure > 0 ? (1e5 * falseAlarms) / exposure : null,
    falseAlarms,
    exposure,
    alarmsPerEvent: mean(events, (e) => e.alarms),
    pagesPerEvent: mean(events, (e) => e.pages),
    maxPagesPerEvent: largest(events, (e) => e.pages),
    adaptationsPerEvent: mean(events, (e) => e.adaptations),
    degradationAlarmsPerEvent: mean(events, (e) => e.degradationAlarms),
    absorbedOnce: share(drifts, (e) => e.adaptations === 1 && e.pages <= 1 && e.degradationAlarms === 0),
    knownModeSilent: share(known, (e) => e.adaptations >= 1 && e.alarms === 0),
  };
}

function share<T>(items: readonly T[], test: (item: T) => boolean): number | null {
  return items.length === 0 ? null : items.filter(test).length / items.length;
}

function mean<T>(items: readonly T[], value: (item: T) => number): number | null {
  return items.length === 0 ? null : items.reduce((s, x) => s + value(x), 0) / items.length;
}

function largest<T>(items: readonly T[], value: (item: T) => number): number | null {
  return items.length === 0 ? null : items.reduce((m, x) => Math.max(m, value(x)), -Infinity);
}

/** Nearest-rank quantile of sorted values (the smallest value with at least q of them at or below it); null when empty. */
export function quantile(sorted: readonly number[], q: number): number | null {
  if (sorted.length === 0) return null;
  return sorted[Math.max(0, Math.ceil(q * sorted.length) - 1)] as number;
}
