import { integerInRange, numberInRange } from "@leeway/core";
import { EVENT_CAUSES, type EventCause } from "./labels.js";
import type { Response } from "./responses.js";

/** A truth or a claimed class: one of the event causes, or "none". */
export type ResponseClass = EventCause | "none";

/** The rows and columns of the confusion table. */
export const RESPONSE_CLASSES: readonly ResponseClass[] = [...EVENT_CAUSES, "none"];

/** Counts indexed [truth][claimed]. */
export type ConfusionTable = Record<ResponseClass, Record<ResponseClass, number>>;

/** How a replay is measured. */
export interface EvaluateOptions {
  /**
   * Longest detection delay that still counts, in samples: an event's
   * attribution window is [start, min(next event's start, start + maxDelay,
   * stream length)). Default: unlimited (the window runs to the next event's start).
   */
  maxDelay?: number;
  /** Confidence level of the run-length interval, in (0, 1). Default 0.95. */
  level?: number;
}

/** The option names of {@link EvaluateOptions}. */
export const EVALUATE_OPTIONS: readonly string[] = ["maxDelay", "level"];

/** Validates {@link EvaluateOptions} and fills in the defaults (unlimited delay, level 0.95). */
export function checkEvaluateOptions(component: string, options: EvaluateOptions): { maxDelay: number; level: number } {
  const maxDelay = options.maxDelay === undefined ? Infinity : integerInRange(component, "maxDelay", options.maxDelay, 1, Number.MAX_SAFE_INTEGER);
  const level = options.level === undefined ? 0.95 : numberInRange(component, "level", options.level, { min: 0, max: 1, minExclusive: true, maxExclusive: true });
  return { maxDelay, level };
}

/** How one labelled event was answered. */
export interface EventResult {
  id: string | null;
  type: string | null;
  cause: EventCause;
  start: number;
  end: number;
  /** End (exclusive) of the span in which the first response is attributed to this event. */
  windowEnd: number;
  /** The first response in the attribution window, or null when the event was missed. */
  response: Response | null;
  /** Samples from start to the response (0 = answered at the first sample), or null. */
  delay: number | null;
  /** What the response claimed, "none" when missed. */
  claimed: ResponseClass;
  /** True when the response claimed the event's true cause. */
  correct: boolean;
  /**
   * When the detection claimed another cause: the first later response in the
   * window that claims the true one (the policy revising its answer, for
   * example a retrain after an alarm on a benign drift), or null.
   */
  revision: Response | null;
}

/** Summary of delays over the detected events, in samples. */
export interface DelaySummary {
  count: number;
  mean: number;
  median: number;
  max: number;
}

/** Counts of one kind of action episode by the truth at the moment it was made. */
export interface ResponseTally {
  count: number;
  /** By what was going on: a fault under way, else the event whose attribution window holds it, else "none". */
  byTruth: Record<ResponseClass, number>;
}

/** Empirical in-control run lengths and the average run length they imply. */
export interface RunLengths {
  /** In-control samples: where a response would be a false alarm. */
  exposure: number;
  /** False alarms in them. */
  falseAlarms: number;
  /** Lengths of the runs that ended in a false alarm (the alarm sample included). */
  completed: number[];
  /** Lengths of the runs cut short by an event, a commissioning span or the stream's end. */
  censored: number[];
  /** exposure / falseAlarms, the estimate of the in-control average run length; null with no false alarm. */
  arl: number | null;
  /** Exact Poisson (Garwood) interval of the false-alarm count turned into ARL bounds; `upper` is null (unbounded) with no false alarm. */
  interval: { level: number; lower: number; upper: number | null };
}

/** ROC and PR areas of one score against the anomaly labels. */
export interface ScoreAreas {
  rocAuc: number;
  prAuc: number;
}

/** Areas of the live and the first reference score, over the samples outside commissioning. */
export interface ScoreMetrics {
  /** Samples used for the live score: outside commissioning, with a finite score. */
  samples: number;
  /** Anomalous samples among them. */
  positives: number;
  /** Null when the samples used hold no positive or no negative label. */
  live: ScoreAreas | null;
  /** Null also when the decisions gave no reference score. */
  reference: ScoreAreas | null;
}

/** Everything `evaluate` measures. */
export interface ReplayMetrics {
  samples: number;
  /** Labelled events that start inside the stream. */
  events: number;
  /** Labelled events that start at or after the stream's end (not measured). */
  eventsBeyondStream: number;
  detected: number;
  missed: number;
  /**
   * Missed events by true cause. A concept drift with no response may be
   * fine — a policy that absorbs a return to a known mode without a word has
   * done its job — while a missed degradation or anomaly never is.
   */
  missedByCause: Record<EventCause, number>;
  /** Detected events whose response claimed the true cause. */
  correctCause: number;
  delay: DelaySummary | null;
  /** Delay summaries per true cause of the detected events. */
  delayByCause: Record<EventCause, DelaySummary | null>;
  /** Rows: the truth (event cause, or "none" for false alarms); columns: what the response claimed ("none" = missed). */
  confusion: ConfusionTable;
  falseAlarms: number;
  /** 10^4 · falseAlarms / exposure; null with no in-control sample. */
  falseAlarmsPer10k: number | null;
  /** Further responses inside a degradation or anomaly event after its first one (not false alarms). */
  repeats: number;
  /** Events whose wrong first claim was revised to the true cause within the window (not false alarms). */
  revisions: number;
  /** `"retrain"` episodes (also those that complete a confirmation request). */
  retrains: ResponseTally;
  /** `"switch-mode"` episodes. */
  modeSwitches: ResponseTally;
  /** `"alarm"` episodes (whatever their cause). */
  alarms: ResponseTally;
  /** Samples learnt (action "learn") while a degradation or an anomaly event was under way. */
  learnedDuring: { degradation: number; anomaly: number };
  runLengths: RunLengths;
  /** Null when no per-sample anomaly labels were given. */
  scores: ScoreMetrics | null;
  perEvent: EventResult[];
  responses: Response[];
}

/** Mean, median and maximum of the delays of detected events; null when there is none. */
export function summarizeDelays(results: readonly EventResult[]): DelaySummary | null {
  const delays = results.map((r) => r.delay).filter((d): d is number => d !== null).sort((a, b) => a - b);
  if (delays.length === 0) return null;
  const mid = delays.length >> 1;
  const median = delays.length % 2 === 1 ? (delays[mid] as number) : 0.5 * ((delays[mid - 1] as number) + (delays[mid] as number));
  return { count: delays.length, mean: delays.reduce((s, d) => s + d, 0) / delays.length, median, max: delays[delays.length - 1] as number };
}

/** A row of zero counts over the response classes. */
export function zeroCounts(): Record<ResponseClass, number> {
  return { "concept-drift": 0, degradation: 0, anomaly: 0, none: 0 };
}
