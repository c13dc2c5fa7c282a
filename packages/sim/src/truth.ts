import type { Scenario } from "./scenario.js";

/** What was true of the machine and its surroundings at one sample. */
export interface SampleTruth {
  index: number;
  /** The operating mode's name. */
  mode: string;
  /** 0 for the commissioning surroundings; k ≥ 1 while the k-th environment shift (in start order) is the latest active one. */
  environment: number;
  /** Degradation severity in [0, 1] (the largest over active degradations; 0 when healthy). */
  severity: number;
  /** The active abrupt fault's kind (`"clog"`, `"looseness"`, `"impacts"`), or null. */
  fault: string | null;
}

/** An interval of the timeline with a known cause, for scoring a policy's decisions. */
export interface TruthEvent {
  id: string;
  type: "mode-change" | "environment-shift" | "degradation" | "fault";
  /** What a correct policy should call it: absorb concept drift, alarm on degradation and anomalies. */
  cause: "concept-drift" | "degradation" | "anomaly";
  /** First sample of the event. */
  start: number;
  /** First sample after it (exclusive). */
  end: number;
  label: string;
}

/**
 * The events of a scenario in start order (ties: schedule first, then the
 * order given): one `"mode-change"` per schedule segment after the first
 * (cause concept drift, label the mode's name, spanning the segment), one
 * `"environment-shift"` (concept drift), `"degradation"` (degradation) or
 * `"fault"` (anomaly) per scheduled event over its [start, end).
 */
export function truthEvents(scenario: Scenario): TruthEvent[] {
  const out: TruthEvent[] = [];
  const { schedule, events, length } = scenario;
  for (let s = 1; s < schedule.length; s++) {
    const seg = schedule[s]!;
    const end = s + 1 < schedule.length ? schedule[s + 1]!.start : length;
    out.push({ id: `mode-change-${s}`, type: "mode-change", cause: "concept-drift", start: seg.start, end, label: seg.mode });
  }
  const counters = { "environment-shift": 0, degradation: 0, fault: 0 };
  for (const e of events) {
    const n = ++counters[e.type];
    const cause = e.type === "environment-shift" ? "concept-drift" : e.type === "degradation" ? "degradation" : "anomaly";
    out.push({ id: `${e.type}-${n}`, type: e.type, cause, start: e.start, end: e.end, label: e.label });
  }
  const rank = (t: TruthEvent["type"]): number => (t === "mode-change" ? 0 : 1);
  return out
    .map((event, order) => ({ event, order }))
    .sort((a, b) => a.event.start - b.event.start || rank(a.event.type) - rank(b.event.type) || a.order - b.order)
    .map((x) => x.event);
}
