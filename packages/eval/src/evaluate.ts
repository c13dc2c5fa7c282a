import { integerInRange, numberInRange, optionsObject } from "@leeway/core";
import { ACTIONS, CAUSES, PHASES, type Action, type Cause } from "@leeway/policy";
import { EVENT_CAUSES, checkAnomalyFlags, checkEvents, type CheckedEvent, type EventCause, type ReplayLabels } from "./labels.js";
import { poissonInterval } from "./poisson-interval.js";
import { prAuc } from "./pr-auc.js";
import { responseClass } from "./responses.js";
import { rocAuc } from "./roc-auc.js";
import type { Timeline } from "./timeline.js";

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

/** One response: the first decision of a run of equal (action, cause) responses. */
export interface Response {
  /** Position in the replayed stream (0-based). */
  position: number;
  action: Action;
  cause: Cause;
  /** What the response claims happened. */
  claims: EventCause;
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
}

/** Summary of delays over the detected events, in samples. */
export interface DelaySummary {
  count: number;
  mean: number;
  median: number;
  max: number;
}

/** Counts of one kind of response by the truth at the moment it was made. */
export interface ResponseTally {
  count: number;
  /** By the truth: the cause of the event it answered or lay in, or "none" (nothing happening). */
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
  /** Samples used: outside commissioning, with finite scores. */
  samples: number;
  positives: number;
  /** Null when the samples used hold no positive or no negative label. */
  live: ScoreAreas | null;
  /** Null when, in addition, the decisions gave no reference score. */
  reference: ScoreAreas | null;
}

/** Everything {@link evaluate} measures. */
export interface ReplayMetrics {
  samples: number;
  /** Labelled events that start inside the stream. */
  events: number;
  /** Labelled events that start at or after the stream's end (not measured). */
  eventsBeyondStream: number;
  detected: number;
  missed: number;
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
  retrains: ResponseTally;
  modeSwitches: ResponseTally;
  alarms: ResponseTally;
  /** Samples learnt (action "learn") while a degradation or an anomaly event was under way. */
  learnedDuring: { degradation: number; anomaly: number };
  runLengths: RunLengths;
  /** Null when no per-sample anomaly labels were given. */
  scores: ScoreMetrics | null;
  perEvent: EventResult[];
  responses: Response[];
}

/** The option names of {@link EvaluateOptions}. */
export const EVALUATE_OPTIONS: readonly string[] = ["maxDelay", "level"];

/** Validates {@link EvaluateOptions} and fills in the defaults (unlimited delay, level 0.95). */
export function checkEvaluateOptions(component: string, options: EvaluateOptions): { maxDelay: number; level: number } {
  const maxDelay = options.maxDelay === undefined ? Infinity : integerInRange(component, "maxDelay", options.maxDelay, 1, Number.MAX_SAFE_INTEGER);
  const level = options.level === undefined ? 0.95 : numberInRange(component, "level", options.level, { min: 0, max: 1, minExclusive: true, maxExclusive: true });
  return { maxDelay, level };
}

const COMMISSIONING = PHASES.indexOf("commissioning");
const LEARN = ACTIONS.indexOf("learn");

/**
 * Measures a decision timeline against labelled events (and optional
 * per-sample anomaly labels).
 *
 * Definitions (positions are 0-based sample positions in the timeline):
 * - **Response**: a decision outside the commissioning phase whose action is
 *   `"alarm"`, `"retrain"`, `"switch-mode"` or `"await-confirmation"` and that
 *   makes a claim ({@link responseClass}: retrain and switch-mode claim concept
 *   drift; alarm and await-confirmation claim their cause), and that starts a
 *   run: the previous decision did not have the same action and cause. A
 *   latched alarm repeated on every sample is one response.
 * - **Attribution window** of an event: [start, min(next later event's start,
 *   start + maxDelay, stream length)). The event's **detection** is the first
 *   response in it; **delay** = its position − start; the event is **missed**
 *   when there is none. The confusion table counts [true cause][claimed class].
 * - **False alarm**: a response that detects no event and does not lie inside
 *   a degradation or anomaly event's [start, end) (such responses are
 *   **repeats**: the fault is really there). A second response after a concept
 *   drift was answered is a false alarm: the new condition is the new normal.
 * - **Exposure** (in-control samples): samples outside commissioning, outside
 *   every degradation and anomaly event, and outside every event's window up
 *   to and including its detection (the whole window when missed) — exactly
 *   the samples at which a response would count as a false alarm.
 *   False alarms per 10^4 samples = 10^4 · false alarms / exposure.
 * - **Run lengths**: a run starts at the first in-control sample after an
 *   excluded stretch or after a false alarm, and ends at the next false alarm
 *   (completed) or at the next excluded sample or the stream's end (censored).
 *   ARL = exposure / false alarms (the maximum-likelihood estimate for a
 *   constant per-sample false-alarm probability, censored runs included), with
 *   the exact Poisson interval of Garwood (1936) for the count.
 * - **Retrains, mode switches, alarms**: responses of each kind, tallied by
 *   the truth where they were made: the cause of the event they detect or lie
 *   in (degradation or anomaly span), else "none".
 * - **Score areas**: ROC AUC (Mann–Whitney, ties ½) and PR AUC (average
 *   precision, tied groups together) of the live and the first reference score
 *   against the anomaly labels, over samples outside commissioning.
 * @example
 * const t = new Timeline();
 * // ... t.record(decision) for each sample
 * const m = evaluate(t, { events: [{ cause: "anomaly", start: 100, end: 160 }] });
 * m.perEvent[0]?.delay; // samples until the first response
 */
export function evaluate(timeline: Timeline, labels?: ReplayLabels, options?: EvaluateOptions): ReplayMetrics {
  const { maxDelay, level } = checkEvaluateOptions("evaluate", optionsObject<EvaluateOptions>("evaluate", options, EVALUATE_OPTIONS));
  const events = checkEvents("evaluate", labels?.events ?? []);
  const n = timeline.length;
  const anomaly = labels?.anomaly === undefined ? null : checkAnomalyFlags("evaluate", labels.anomaly, n);

  const phases = timeline.phaseCodes();
  const responses = findResponses(timeline);
  const reached = events.filter((e) => e.start < n);
  const perEvent = reached.map((e, k) => attribute(e, nextStart(reached, k), maxDelay, n, responses));

  // Excluded from the exposure: commissioning, fault spans, pre-detection windows.
  const excluded = new Uint8Array(n);
  const faultSpan = new Int32Array(n).fill(-1); // index into `reached` of a degradation/anomaly event covering the sample
  for (let i = 0; i < n; i++) if (phases[i] === COMMISSIONING) excluded[i] = 1;
  reached.forEach((e, k) => {
    const result = perEvent[k] as EventResult;
    const until = result.response === null ? result.windowEnd : result.response.position + 1;
    excluded.fill(1, e.start, until);
    if (e.cause !== "concept-drift") {
      excluded.fill(1, e.start, Math.min(e.end, n));
      for (let i = e.start; i < Math.min(e.end, n); i++) if (faultSpan[i] === -1) faultSpan[i] = k;
    }
  });

  const detectionOf = new Map<number, number>(); // response position → first event (index in reached) it detects
  perEvent.forEach((r, k) => {
    if (r.response !== null && !detectionOf.has(r.response.position)) detectionOf.set(r.response.position, k);
  });

  const falseAlarmAt = new Uint8Array(n);
  let falseAlarms = 0;
  let repeats = 0;
  const confusion = emptyConfusion();
  const retrains = emptyTally();
  const modeSwitches = emptyTally();
  const alarms = emptyTally();
  for (const r of responses) {
    const detected = detectionOf.get(r.position);
    const span = faultSpan[r.position] as number;
    let truth: ResponseClass;
    if (detected !== undefined) truth = (reached[detected] as CheckedEvent).cause;
    else if (span >= 0) {
      truth = (reached[span] as CheckedEvent).cause;
      repeats++;
    } else {
      truth = "none";
      falseAlarms++;
      falseAlarmAt[r.position] = 1;
      confusion.none[r.claims]++;
    }
    const tally = r.action === "retrain" ? retrains : r.action === "switch-mode" ? modeSwitches : alarms;
    tally.count++;
    tally.byTruth[truth]++;
  }
  for (const r of perEvent) confusion[r.cause][r.claimed]++;

  let exposure = 0;
  for (let i = 0; i < n; i++) if (excluded[i] === 0) exposure++;
  const actions = timeline.actionCodes();
  const learnedDuring = { degradation: 0, anomaly: 0 };
  for (let i = 0; i < n; i++) {
    const span = faultSpan[i] as number;
    if (span >= 0 && actions[i] === LEARN && phases[i] !== COMMISSIONING) learnedDuring[(reached[span] as CheckedEvent).cause as "degradation" | "anomaly"]++;
  }

  const detectedResults = perEvent.filter((r) => r.response !== null);
  const delayByCause = {} as Record<EventCause, DelaySummary | null>;
  for (const cause of EVENT_CAUSES) delayByCause[cause] = summarizeDelays(detectedResults.filter((r) => r.cause === cause));

  return {
    samples: n,
    events: reached.length,
    eventsBeyondStream: events.length - reached.length,
    detected: detectedResults.length,
    missed: perEvent.length - detectedResults.length,
    correctCause: perEvent.filter((r) => r.correct).length,
    delay: summarizeDelays(detectedResults),
    delayByCause,
    confusion,
    falseAlarms,
    falseAlarmsPer10k: exposure > 0 ? (1e4 * falseAlarms) / exposure : null,
    repeats,
    retrains,
    modeSwitches,
    alarms,
    learnedDuring,
    runLengths: runLengths(excluded, falseAlarmAt, exposure, falseAlarms, level),
    scores: anomaly === null ? null : scoreMetrics(timeline, anomaly),
    perEvent,
    responses,
  };
}

/** The responses of a timeline, in order (see {@link evaluate} for the definition). */
export function findResponses(timeline: Timeline): Response[] {
  const actions = timeline.actionCodes();
  const causes = timeline.causeCodes();
  const phases = timeline.phaseCodes();
  const out: Response[] = [];
  let previousAction = -1;
  let previousCause = -1;
  for (let i = 0; i < timeline.length; i++) {
    const a = actions[i] as number;
    const c = causes[i] as number;
    const continuing = a === previousAction && c === previousCause;
    previousAction = a;
    previousCause = c;
    if (continuing || phases[i] === COMMISSIONING) continue;
    const action = ACTIONS[a] as Action;
    const cause = CAUSES[c] as Cause;
    const claims = responseClass(action, cause);
    if (claims !== null) out.push({ position: i, action, cause, claims });
  }
  return out;
}

function nextStart(sorted: readonly CheckedEvent[], k: number): number {
  const start = (sorted[k] as CheckedEvent).start;
  for (let j = k + 1; j < sorted.length; j++) {
    const s = (sorted[j] as CheckedEvent).start;
    if (s > start) return s;
  }
  return Infinity;
}

function attribute(e: CheckedEvent, next: number, maxDelay: number, n: number, responses: readonly Response[]): EventResult {
  const windowEnd = Math.min(next, e.start + maxDelay, n);
  const first = firstAtOrAfter(responses, e.start);
  const response = first !== undefined && first.position < windowEnd ? first : null;
  const claimed: ResponseClass = response === null ? "none" : response.claims;
  return {
    id: e.id,
    type: e.type,
    cause: e.cause,
    start: e.start,
    end: e.end,
    windowEnd,
    response,
    delay: response === null ? null : response.position - e.start,
    claimed,
    correct: claimed === e.cause,
  };
}

function firstAtOrAfter(responses: readonly Response[], position: number): Response | undefined {
  let low = 0;
  let high = responses.length;
  while (low < high) {
    const mid = (low + high) >>> 1;
    if ((responses[mid] as Response).position < position) low = mid + 1;
    else high = mid;
  }
  return responses[low];
}

function runLengths(excluded: Uint8Array, falseAlarmAt: Uint8Array, exposure: number, falseAlarms: number, level: number): RunLengths {
  const completed: number[] = [];
  const censored: number[] = [];
  let runStart = -1;
  for (let i = 0; i < excluded.length; i++) {
    if (excluded[i] === 1) {
      if (runStart >= 0) censored.push(i - runStart);
      runStart = -1;
      continue;
    }
    if (runStart < 0) runStart = i;
    if (falseAlarmAt[i] === 1) {
      completed.push(i - runStart + 1);
      runStart = -1;
    }
  }
  if (runStart >= 0) censored.push(excluded.length - runStart);
  const counts = poissonInterval(falseAlarms, level);
  return {
    exposure,
    falseAlarms,
    completed,
    censored,
    arl: falseAlarms > 0 ? exposure / falseAlarms : null,
    interval: { level, lower: exposure / counts.upper, upper: counts.lower > 0 ? exposure / counts.lower : null },
  };
}

function scoreMetrics(timeline: Timeline, anomaly: ArrayLike<boolean>): ScoreMetrics {
  const phases = timeline.phaseCodes();
  const live = timeline.liveScores();
  const reference = timeline.referenceScores();
  const liveScores: number[] = [];
  const liveLabels: boolean[] = [];
  const refScores: number[] = [];
  const refLabels: boolean[] = [];
  for (let i = 0; i < timeline.length; i++) {
    if (phases[i] === COMMISSIONING) continue;
    const l = live[i] as number;
    const r = reference[i] as number;
    const flag = anomaly[i] === true;
    if (Number.isFinite(l)) {
      liveScores.push(l);
      liveLabels.push(flag);
    }
    if (Number.isFinite(r)) {
      refScores.push(r);
      refLabels.push(flag);
    }
  }
  const positives = liveLabels.filter(Boolean).length;
  return { samples: liveScores.length, positives, live: areas(liveScores, liveLabels), reference: areas(refScores, refLabels) };
}

function areas(scores: number[], labels: boolean[]): ScoreAreas | null {
  const positives = labels.filter(Boolean).length;
  if (positives === 0 || positives === labels.length) return null;
  return { rocAuc: rocAuc(scores, labels), prAuc: prAuc(scores, labels) };
}

/** Mean, median and maximum of the delays of detected events; null when there is none. */
export function summarizeDelays(results: readonly EventResult[]): DelaySummary | null {
  const delays = results.map((r) => r.delay).filter((d): d is number => d !== null).sort((a, b) => a - b);
  if (delays.length === 0) return null;
  const mid = delays.length >> 1;
  const median = delays.length % 2 === 1 ? (delays[mid] as number) : 0.5 * ((delays[mid - 1] as number) + (delays[mid] as number));
  return { count: delays.length, mean: delays.reduce((s, d) => s + d, 0) / delays.length, median, max: delays[delays.length - 1] as number };
}

function emptyRow(): Record<ResponseClass, number> {
  return { "concept-drift": 0, degradation: 0, anomaly: 0, none: 0 };
}

function emptyConfusion(): ConfusionTable {
  return { "concept-drift": emptyRow(), degradation: emptyRow(), anomaly: emptyRow(), none: emptyRow() };
}

function emptyTally(): ResponseTally {
  return { count: 0, byTruth: emptyRow() };
}
