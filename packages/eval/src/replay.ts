import { booleanOption, optionsObject } from "@leeway/core";
import type { Decision } from "@leeway/policy";
import { evaluate } from "./evaluate.js";
import { EVALUATE_OPTIONS, checkEvaluateOptions, type EvaluateOptions, type ReplayMetrics } from "./metrics.js";
import type { ReplayLabels } from "./labels.js";
import { Timeline } from "./timeline.js";

/**
 * Anything that turns one sample into one decision: a feature-mode decision
 * engine (`observe(x: Float64Array)`), a score-only wrapper ({@link scoreOnly}),
 * or a whole signal → pool → policy chain.
 */
export interface Pipeline<S> {
  observe(sample: S): Decision;
}

/** How a replay runs and is measured. */
export interface ReplayOptions extends EvaluateOptions {
  /**
   * Keep every decision object in the result (default true). Set it to false
   * for long replays, or when the pipeline reuses one decision object; the
   * metrics need only the compact {@link Timeline}.
   */
  keepDecisions?: boolean;
}

/** The decision timeline of a replay and its metrics. */
export interface ReplayResult {
  /** Every decision, in order (empty under `keepDecisions: false`). */
  decisions: Decision[];
  /** The compact timeline the metrics were computed from. */
  timeline: Timeline;
  metrics: ReplayMetrics;
}

const REPLAY_OPTIONS = [...EVALUATE_OPTIONS, "keepDecisions"];

/**
 * Runs a pipeline over a stream, one `observe` per sample, and measures the
 * decisions against the labels (see {@link evaluate} for every definition).
 * Without labels every response counts as a false alarm: the stream is taken
 * as in control throughout.
 * @example
 * const pipeline = { observe: (s: number): Decision => ({ index: 0, action: s > 5 ? "alarm" : "learn", cause: s > 5 ? "anomaly" : "normal", phase: "watching", evidence: { liveScore: s, referenceScores: [s] } }) };
 * const { metrics } = replay(pipeline, [1, 2, 9, 9, 1], { events: [{ cause: "anomaly", start: 2, end: 4 }] });
 * metrics.perEvent[0]?.delay; // 0
 * metrics.falseAlarms;        // 0
 */
export function replay<S>(pipeline: Pipeline<S>, stream: Iterable<S>, labels?: ReplayLabels, options?: ReplayOptions): ReplayResult {
  const { keep, evaluation } = splitOptions("replay", options);
  const timeline = new Timeline();
  const decisions: Decision[] = [];
  for (const sample of stream) {
    const decision = pipeline.observe(sample);
    timeline.record(decision);
    if (keep) decisions.push(decision);
  }
  return { decisions, timeline, metrics: evaluate(timeline, labels, evaluation) };
}

/** {@link replay} over an asynchronous stream (for example lines read from a file). */
export async function replayAsync<S>(pipeline: Pipeline<S>, stream: AsyncIterable<S> | Iterable<S>, labels?: ReplayLabels, options?: ReplayOptions): Promise<ReplayResult> {
  const { keep, evaluation } = splitOptions("replayAsync", options);
  const timeline = new Timeline();
  const decisions: Decision[] = [];
  for await (const sample of stream) {
    const decision = pipeline.observe(sample);
    timeline.record(decision);
    if (keep) decisions.push(decision);
  }
  return { decisions, timeline, metrics: evaluate(timeline, labels, evaluation) };
}

/** One sample of a score-only stream: the host model's live score and, optionally, its reference scores. */
export interface ScoreSample {
  live: number;
  references?: number[];
}

/** What {@link scoreOnly} needs of an engine: its score-only entry point. */
export interface ScoreOnlyEngine {
  observeScores(live: number, references?: number[]): Decision;
}

/**
 * Wraps a score-only engine as a {@link Pipeline} over `{ live, references? }`
 * samples, for hosts that bring their own model.
 * @example
 * const pipeline = scoreOnly(engine);
 * replay(pipeline, [{ live: 0.12 }, { live: 0.11, references: [0.13] }]);
 */
export function scoreOnly(engine: ScoreOnlyEngine): Pipeline<ScoreSample> {
  return {
    observe: (sample: ScoreSample): Decision => (sample.references === undefined ? engine.observeScores(sample.live) : engine.observeScores(sample.live, sample.references)),
  };
}

function splitOptions(component: string, options: ReplayOptions | undefined): { keep: boolean; evaluation: EvaluateOptions } {
  const opts = optionsObject<ReplayOptions>(component, options, REPLAY_OPTIONS);
  const keep = opts.keepDecisions === undefined ? true : booleanOption(component, "keepDecisions", opts.keepDecisions);
  checkEvaluateOptions(component, opts);
  const evaluation: EvaluateOptions = {};
  if (opts.maxDelay !== undefined) evaluation.maxDelay = opts.maxDelay;
  if (opts.level !== undefined) evaluation.level = opts.level;
  return { keep, evaluation };
}
