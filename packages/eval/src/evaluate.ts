import { optionsObject } from "@leeway/core";
import { ACTIONS, PHASES } from "@leeway/policy";
import { EVENT_CAUSES, checkAnomalyFlags, checkEvents, type CheckedEvent, type EventCause, type ReplayLabels } from "./labels.js";
import {
  EVALUATE_OPTIONS,
  checkEvaluateOptions,
  summarizeDelays,
  zeroCounts,
  type ConfusionTable,
  type DelaySummary,
  type EvaluateOptions,
  type EventResult,
  type ReplayMetrics,
  type ResponseClass,
  type ResponseTally,
  type ScoreAreas,
  type ScoreMetrics,
} from "./metrics.js";
import { averagePrecisionSorted } from "./pr-auc.js";
import { findEpisodes, findResponses, type Response } from "./responses.js";
import { mannWhitneySorted } from "./roc-auc.js";
import { sortFloat64 } from "./sort-float64.js";
import { runLengths } from "./run-lengths.js";
import type { Timeline } from "./timeline.js";

const COMMISSIONING = PHASES.indexOf("commissioning");
const LEARN = ACTIONS.indexOf("learn");
// Codes of windowCause; 0 = no event window.
const CAUSE_CODES: readonly (EventCause | undefined)[] = [undefined, ...EVENT_CAUSES];

/**
 * Measures a decision timeline against labelled events (and optional
 * per-sample anomaly labels).
 *
 * Definitions (positions are 0-based sample positions in the timeline):
 * - **Response**: a decision outside the commissioning phase whose action is
 *   `"alarm"`, `"retrain"`, `"switch-mode"` or `"await-confirmation"`, that
 *   makes a claim ({@link responseClass}: retrain and switch-mode claim concept
 *   drift; alarm and await-confirmation claim their cause), and that starts a
 *   run: the previous decision did not have the same action and cause. A
 *   latched alarm repeated on every sample is one response; a retrain that
 *   completes a pending await-confirmation is part of it.
 * - **Attribution window** of an event: [start, min(next later event's start,
 *   start + maxDelay, stream length)). The event's **detection** is the first
 *   response in it; **delay** = its position − start; the event is **missed**
 *   when there is none. The confusion table counts [true cause][claimed class].
 * - **Revision**: when the detection claimed a wrong cause, the first later
 *   response in the window that claims the true one (an alarm on a benign
 *   drift followed by a retrain); it is listed with the event and is not a
 *   false alarm. The confusion table keeps the first claim.
 * - **False alarm**: a response that detects no event, is no revision and
 *   does not lie inside a degradation or anomaly event's [start, end) (such
 *   responses are **repeats**: the fault is really there). A further response
 *   after a concept drift was answered is a false alarm: the new condition is
 *   the new normal.
 * - **Exposure** (in-control samples): samples outside commissioning, outside
 *   every degradation and anomaly event, and outside every event's window up
 *   to and including its detection (the whole window when missed) — exactly
 *   the samples at which a response would count as a false alarm.
 *   False alarms per 10^4 samples = 10^4 · false alarms / exposure.
 * - **Run lengths**: see {@link runLengths}; ARL = exposure / false alarms
 *   with the exact Poisson interval of Garwood (1936).
 * - **Retrains, mode switches, alarms**: episodes of each action, tallied by
 *   what was going on where they were made: a degradation or anomaly under
 *   way (anomaly first), else the cause of the latest-starting event whose
 *   attribution window holds them, else "none" (a retrain that completes a confirmation
 *   request counts where the request was made). A retrain tallied under
 *   concept drift may still be a false alarm when the drift had already been
 *   answered.
 * - **Score areas**: ROC AUC (Mann–Whitney, ties ½) and PR AUC (average
 *   precision, tied groups together) of the live and the first reference score
 *   against the anomaly labels, over the samples outside commissioning.
 * @example
 * const t = new Timeline();
 * const decide = (action: Action, cause: Cause): Decision => ({ index: t.length, action, cause, phase: "watching", evidence: { liveScore: 1, referenceScores: [1] } });
 * for (let i = 0; i < 10; i++) t.record(i === 6 ? decide("alarm", "anomaly") : decide("learn", "normal"));
 * const m = evaluate(t, { events: [{ cause: "anomaly", start: 4, end: 8 }] });
 * [m.perEvent[0]?.delay, m.perEvent[0]?.claimed, m.falseAlarms, m.runLengths.exposure]; // [2, "anomaly", 0, 6]
 */
export function evaluate(timeline: Timeline, labels?: ReplayLabels, options?: EvaluateOptions): ReplayMetrics {
  const { maxDelay, level } = checkEvaluateOptions("evaluate", optionsObject<EvaluateOptions>("evaluate", options, EVALUATE_OPTIONS));
  const events = checkEvents("evaluate", labels?.events ?? []);
  const n = timeline.length;
  const anomaly = labels?.anomaly === undefined ? null : checkAnomalyFlags("evaluate", labels.anomaly, n);

  const episodes = findEpisodes(timeline);
  const responses = findResponses(episodes);
  const reached = events.filter((e) => e.start < n);
  const perEvent = reached.map((e, k) => attribute(e, nextStart(reached, k), maxDelay, n, responses));

  // faultCause[i]: 0 none, 1 degradation, 2 anomaly (an anomaly wins where both are under way).
  // windowCause[i]: the code (CAUSE_CODES) of the latest-starting event whose attribution window holds i, or 0.
  const faultCause = new Uint8Array(n);
  const windowCause = new Uint8Array(n);
  const excluded = new Uint8Array(n);
  const phases = timeline.phaseCodes();
  for (let i = 0; i < n; i++) if (phases[i] === COMMISSIONING) excluded[i] = 1;
  reached.forEach((e, k) => {
    const result = perEvent[k] as EventResult;
    windowCause.fill(CAUSE_CODES.indexOf(e.cause), e.start, result.windowEnd);
    excluded.fill(1, e.start, result.response === null ? result.windowEnd : result.response.position + 1);
    if (e.cause === "concept-drift") return;
    const end = Math.min(e.end, n);
    excluded.fill(1, e.start, end);
    for (let i = e.start; i < end; i++) if (e.cause === "anomaly" || faultCause[i] === 0) faultCause[i] = e.cause === "anomaly" ? 2 : 1;
  });
  // What was going on at sample i: a fault under way, else the event whose window holds it, else nothing.
  const situation = (i: number): ResponseClass => (faultCause[i] !== 0 ? spanCause(faultCause[i] as number) : (CAUSE_CODES[windowCause[i] as number] ?? "none"));

  const detects = new Set<number>(); // positions of the responses that detect or revise an event's answer
  for (const r of perEvent) {
    if (r.response !== null) detects.add(r.response.position);
    if (r.revision !== null) detects.add(r.revision.position);
  }

  const confusion = emptyConfusion();
  for (const r of perEvent) confusion[r.cause][r.claimed]++;
  const falseAlarmAt = new Uint8Array(n);
  const completes = new Map<number, number>(); // retrain position → position of the await-confirmation it completes
  let falseAlarms = 0;
  let repeats = 0;
  for (const r of responses) {
    if (r.completedAt !== null) completes.set(r.completedAt, r.position);
    if (detects.has(r.position)) continue;
    if (faultCause[r.position] !== 0) {
      repeats++;
      continue;
    }
    falseAlarms++;
    falseAlarmAt[r.position] = 1;
    confusion.none[r.claims]++;
  }

  const retrains = emptyTally();
  const modeSwitches = emptyTally();
  const alarms = emptyTally();
  for (const e of episodes) {
    const tally = e.action === "retrain" ? retrains : e.action === "switch-mode" ? modeSwitches : e.action === "alarm" ? alarms : null;
    if (tally === null) continue;
    tally.count++;
    tally.byTruth[situation(completes.get(e.position) ?? e.position)]++;
  }

  const actions = timeline.actionCodes();
  const learnedDuring = { degradation: 0, anomaly: 0 };
  for (let i = 0; i < n; i++) {
    if (actions[i] !== LEARN || phases[i] === COMMISSIONING) continue;
    if (faultCause[i] === 1) learnedDuring.degradation++;
    else if (faultCause[i] === 2) learnedDuring.anomaly++;
  }

  const detected = perEvent.filter((r) => r.response !== null);
  const delayByCause = {} as Record<EventCause, DelaySummary | null>;
  const missedByCause = {} as Record<EventCause, number>;
  for (const cause of EVENT_CAUSES) {
    delayByCause[cause] = summarizeDelays(detected.filter((r) => r.cause === cause));
    missedByCause[cause] = perEvent.filter((r) => r.response === null && r.cause === cause).length;
  }
  const runs = runLengths(excluded, falseAlarmAt, level);

  return {
    samples: n,
    events: reached.length,
    eventsBeyondStream: events.length - reached.length,
    detected: detected.length,
    missed: perEvent.length - detected.length,
    missedByCause,
    correctCause: perEvent.filter((r) => r.correct).length,
    delay: summarizeDelays(detected),
    delayByCause,
    confusion,
    falseAlarms,
    falseAlarmsPer10k: runs.exposure > 0 ? (1e4 * falseAlarms) / runs.exposure : null,
    repeats,
    revisions: perEvent.filter((r) => r.revision !== null).length,
    retrains,
    modeSwitches,
    alarms,
    learnedDuring,
    runLengths: runs,
    scores: anomaly === null ? null : scoreMetrics(timeline, anomaly),
    perEvent,
    responses,
  };
}

function spanCause(code: number): ResponseClass {
  return code === 1 ? "degradation" : code === 2 ? "anomaly" : "none";
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
  const from = firstAtOrAfter(responses, e.start);
  const first = responses[from];
  const response = first !== undefined && first.position < windowEnd ? first : null;
  const claimed: ResponseClass = response === null ? "none" : response.claims;
  let revision: Response | null = null;
  if (response !== null && response.claims !== e.cause) {
    for (let j = from + 1; j < responses.length && (responses[j] as Response).position < windowEnd; j++) {
      if ((responses[j] as Response).claims === e.cause) {
        revision = responses[j] as Response;
        break;
      }
    }
  }
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
    revision,
  };
}

// Index of the first response at or after the position (responses.length when none).
function firstAtOrAfter(responses: readonly Response[], position: number): number {
  let low = 0;
  let high = responses.length;
  while (low < high) {
    const mid = (low + high) >>> 1;
    if ((responses[mid] as Response).position < position) low = mid + 1;
    else high = mid;
  }
  return low;
}

function scoreMetrics(timeline: Timeline, anomaly: ArrayLike<boolean>): ScoreMetrics {
  const live = areas(timeline, timeline.liveScores(), anomaly);
  const reference = areas(timeline, timeline.referenceScores(), anomaly);
  return { samples: live.samples, positives: live.positives, live: live.areas, reference: reference.areas };
}

// Areas of one score over the samples outside commissioning with a finite score.
function areas(timeline: Timeline, scores: Float64Array, anomaly: ArrayLike<boolean>): { samples: number; positives: number; areas: ScoreAreas | null } {
  const phases = timeline.phaseCodes();
  let positives = 0;
  let negatives = 0;
  for (let i = 0; i < scores.length; i++) {
    if (phases[i] === COMMISSIONING || !Number.isFinite(scores[i] as number)) continue;
    if (anomaly[i] === true) positives++;
    else negatives++;
  }
  if (positives === 0 || negatives === 0) return { samples: positives + negatives, positives, areas: null };
  const split = { positives: new Float64Array(positives), negatives: new Float64Array(negatives) };
  for (let i = 0, p = 0, q = 0; i < scores.length; i++) {
    const s = scores[i] as number;
    if (phases[i] === COMMISSIONING || !Number.isFinite(s)) continue;
    if (anomaly[i] === true) split.positives[p++] = s;
    else split.negatives[q++] = s;
  }
  sortFloat64(split.positives);
  sortFloat64(split.negatives);
  return { samples: positives + negatives, positives, areas: { rocAuc: mannWhitneySorted(split).auc, prAuc: averagePrecisionSorted(split) } };
}

function emptyConfusion(): ConfusionTable {
  return { "concept-drift": zeroCounts(), degradation: zeroCounts(), anomaly: zeroCounts(), none: zeroCounts() };
}

function emptyTally(): ResponseTally {
  return { count: 0, byTruth: zeroCounts() };
}
