import { ACTIONS, CAUSES, DecisionEngine, PHASES, type Decision, type DecisionEngineOptions } from "@leeway/policy";
import { MachineSimulator } from "@leeway/sim";
import { evaluate } from "./evaluate.js";
import type { ResponseClass } from "./metrics.js";
import { NaivePolicy } from "./naive-policies.js";
import { onsetCusumAlarms } from "./onset-cusum.js";
import { eventSeverity, type QualityKind, type QualityRate, type QualityScenario } from "./quality-scenarios.js";
import { findEpisodes, type ActionEpisode } from "./responses.js";
import { Timeline } from "./timeline.js";

/** The policies the suite compares, in table order. */
export const QUALITY_POLICIES = ["engine, operator", "engine, unattended", "frozen only", "always adapt", "onset CUSUM"] as const;

/** One of {@link QUALITY_POLICIES}. */
export type QualityPolicy = (typeof QUALITY_POLICIES)[number];

/** Someone (or a script) who answers the engine: looks at each decision and may call its operator methods. */
export interface QualityOperator {
  after(decision: Decision): void;
}

/**
 * What an operator finds on inspecting the machine at sample i: true when no
 * fault or degradation is under way (whatever changed is benign), false
 * otherwise. A site operator answers a retrain question after looking.
 */
export type MachineInspection = (i: number) => boolean;

/** How {@link runQualityScenario} runs. */
export interface QualityRunOptions {
  /** Makes the operator of the attended engine run (for example a scripted operator that acknowledges alarms). */
  operator: (engine: DecisionEngine, samplePeriod: number, inspect: MachineInspection) => QualityOperator;
  /** The engine's options at a sample period (seconds) for feature vectors of `inputs` values. Default {@link defaultQualityEngineOptions}. */
  engineOptions?: (samplePeriod: number, inputs: number) => DecisionEngineOptions;
  /** Called every 1000 samples (and at the end) with the samples simulated since the last call. */
  onProgress?: (samples: number) => void;
}

/**
 * The engine in the suite: feature mode with a pool of 3 members of 8 hidden
 * units (the decisions hardly depend on the network's size; the cost does),
 * feature signatures used in the rules, every other option at its default for the sample period, seed 1.
 * @example
 * defaultQualityEngineOptions(1, 64); // { inputs: 64, hidden: 8, members: 3, seed: 1, samplePeriod: 1, featureSignature: "rules" }
 */
export function defaultQualityEngineOptions(samplePeriod: number, inputs: number): DecisionEngineOptions {
  return { inputs, hidden: 8, members: 3, seed: 1, samplePeriod, featureSignature: "rules" };
}

/** Commissioning and calibration spans of the naive baselines, in samples (the engine's defaults on main). */
export const NAIVE_COMMISSIONING = 600;
export const NAIVE_CALIBRATION = 600;
/** In-control ARL the onset CUSUM's threshold is set for, in samples (the engine's default targetArl0). */
export const ONSET_CUSUM_ARL0 = 20_000;

/** How one policy answered one true event. Delays and spans are in samples. */
export interface EventOutcome {
  kind: QualityKind;
  cause: ResponseClass;
  start: number;
  end: number;
  knownMode: boolean;
  /** A response (alarm, retrain, switch, question) in the event's attribution window (up to the next event). */
  detected: boolean;
  /** What that first response claimed ("none" when missed). */
  claimed: ResponseClass;
  /** Samples from the onset to that response, or null. */
  delay: number | null;
  /** Samples from the onset to the first decision whose cause is not "normal" (learning stops and the decision says why), or null. */
  reactionDelay: number | null;
  /** The event's severity at the first response, or null. */
  severityAtDetection: number | null;
  /** The severity at the first alarm whose cause is "degradation" during the event, or null. */
  degradationAlarmSeverity: number | null;
  /** Samples learnt (outside commissioning) while the event was under way. */
  learnt: number;
  /** Samples learnt from the first decision with cause "degradation" (a warning or an alarm) to the event's end; null without one. */
  learntAfterWarning: number | null;
  /** Alarm episodes from the onset to the next event (or the stream's end): the alarm, its reminders and any later ones. */
  alarms: number;
  /** Of those, alarms with cause "degradation". */
  degradationAlarms: number;
  /** Operator pages over the same span: alarm episodes plus await-confirmation episodes. */
  pages: number;
  /** Retrain and switch-mode episodes over the same span. */
  adaptations: number;
}

/** One policy over one scenario. */
export interface PolicyOutcome {
  policy: QualityPolicy;
  samples: number;
  /** In-control samples (where a response would be a false alarm; see `evaluate`). */
  exposure: number;
  falseAlarms: number;
  events: EventOutcome[];
}

/** Every policy over one scenario (plain data, so it can cross a worker boundary). */
export interface ScenarioOutcome {
  id: string;
  kind: QualityKind;
  rate: QualityRate;
  variant: string;
  samples: number;
  policies: PolicyOutcome[];
}

const LEARN = ACTIONS.indexOf("learn");
const COMMISSIONING = PHASES.indexOf("commissioning");
const DEGRADATION = CAUSES.indexOf("degradation");
const NORMAL = CAUSES.indexOf("normal");

/**
 * Simulates one suite scenario once and feeds every sample to each policy of
 * {@link QUALITY_POLICIES}: the engine (through its public `observe`) with an
 * operator and unattended (nobody answers), the two naive baselines
 * ({@link NaivePolicy}), and the onset-tuned CUSUM ({@link onsetCusumAlarms},
 * on the frozen baseline's scores). Measures each against the scenario's
 * ground truth with {@link evaluate} plus the per-event counts of
 * {@link EventOutcome}.
 * @example
 * const s = qualityScenarios().find((q) => q.kind === "fault") as QualityScenario;
 * const outcome = runQualityScenario(s, { operator: () => ({ after: () => {} }) });
 * outcome.policies.map((p) => p.policy); // ["engine, operator", "engine, unattended", "frozen only", "always adapt", "onset CUSUM"]
 */
export function runQualityScenario(qs: QualityScenario, options: QualityRunOptions): ScenarioOutcome {
  const inputs = qs.scenario.bins;
  const engineOptions = (options.engineOptions ?? defaultQualityEngineOptions)(qs.samplePeriod, inputs);
  const attended = new DecisionEngine(engineOptions);
  const faults = qs.events.filter((e) => e.cause !== "concept-drift");
  const operator = options.operator(attended, qs.samplePeriod, (i) => !faults.some((e) => i >= e.start && i < e.end));
  const unattended = new DecisionEngine({ ...engineOptions, attendance: "unattended" });
  const naive = (kind: "frozen" | "adapt"): NaivePolicy =>
    new NaivePolicy({ kind, inputs, hidden: 8, commissioning: NAIVE_COMMISSIONING, calibration: NAIVE_CALIBRATION, run: 5, forgetting: 0.999, seed: "1" });
  const frozen = naive("frozen");
  const adapt = naive("adapt");
  const timelines = QUALITY_POLICIES.map(() => new Timeline());
  const n = qs.scenario.length;
  const frozenScores = new Float64Array(n);

  const sim = new MachineSimulator(qs.scenario);
  let pending = 0;
  for (let r = sim.next(); r !== null; r = sim.next()) {
    const x = Float64Array.from(r.spectrum);
    const d0 = attended.observe(x);
    timelines[0]!.record(d0);
    operator.after(d0);
    timelines[1]!.record(unattended.observe(x));
    const d2 = frozen.observe(x);
    timelines[2]!.record(d2);
    frozenScores[r.index] = d2.evidence.liveScore;
    timelines[3]!.record(adapt.observe(x));
    if (++pending === 1000) {
      options.onProgress?.(pending);
      pending = 0;
    }
  }
  if (pending > 0) options.onProgress?.(pending);

  const flags = onsetCusumAlarms({
    scores: frozenScores,
    calibrationStart: NAIVE_COMMISSIONING,
    calibrationEnd: NAIVE_COMMISSIONING + NAIVE_CALIBRATION,
    events: qs.events,
    targetArl0: ONSET_CUSUM_ARL0,
  });
  const cusum = timelines[4]!;
  for (let i = 0; i < n; i++) {
    const phase = i < NAIVE_COMMISSIONING + NAIVE_CALIBRATION ? "commissioning" : "watching";
    cusum.record({ index: i, action: flags[i] === 1 ? "alarm" : "hold", cause: flags[i] === 1 ? "anomaly" : "normal", phase, evidence: { liveScore: frozenScores[i] as number, referenceScores: [] } });
  }

  return {
    id: qs.id,
    kind: qs.kind,
    rate: qs.rate,
    variant: qs.variant,
    samples: n,
    policies: QUALITY_POLICIES.map((policy, p) => measure(policy, timelines[p]!, qs)),
  };
}

function measure(policy: QualityPolicy, timeline: Timeline, qs: QualityScenario): PolicyOutcome {
  const labels = { events: qs.events.map((e) => ({ cause: e.cause, start: e.start, end: e.end, type: e.kind })) };
  const metrics = evaluate(timeline, labels);
  const episodes = findEpisodes(timeline);
  const actions = timeline.actionCodes();
  const causes = timeline.causeCodes();
  const phases = timeline.phaseCodes();
  const n = timeline.length;
  const events = qs.events.map((e, k): EventOutcome => {
    const result = metrics.perEvent[k];
    const spanEnd = Math.min(n, qs.events[k + 1]?.start ?? n);
    const inSpan = episodes.filter((ep) => ep.position >= e.start && ep.position < spanEnd);
    const count = (test: (ep: ActionEpisode) => boolean): number => inSpan.filter(test).length;
    const end = Math.min(e.end, n);
    let learnt = 0;
    let warning = -1;
    let learntAfterWarning = 0;
    for (let i = e.start; i < end; i++) {
      if (phases[i] === COMMISSIONING) continue;
      if (warning < 0 && causes[i] === DEGRADATION) warning = i;
      if (actions[i] !== LEARN) continue;
      learnt++;
      if (warning >= 0) learntAfterWarning++;
    }
    let reaction = -1;
    for (let i = e.start; i < spanEnd && reaction < 0; i++) if (phases[i] !== COMMISSIONING && causes[i] !== NORMAL) reaction = i;
    const degradationAlarm = inSpan.find((ep) => ep.action === "alarm" && ep.cause === "degradation" && ep.position < end);
    const response = result?.response ?? null;
    return {
      kind: e.kind,
      cause: e.cause,
      start: e.start,
      end: e.end,
      knownMode: e.knownMode,
      detected: response !== null,
      claimed: result?.claimed ?? "none",
      delay: result?.delay ?? null,
      reactionDelay: reaction < 0 ? null : reaction - e.start,
      severityAtDetection: response === null ? null : eventSeverity(qs, e, Math.min(response.position, end - 1)),
      degradationAlarmSeverity: degradationAlarm === undefined ? null : eventSeverity(qs, e, degradationAlarm.position),
      learnt: e.cause === "concept-drift" ? 0 : learnt,
      learntAfterWarning: warning < 0 ? null : learntAfterWarning,
      alarms: count((ep) => ep.action === "alarm"),
      degradationAlarms: count((ep) => ep.action === "alarm" && ep.cause === "degradation"),
      pages: count((ep) => ep.action === "alarm" || ep.action === "await-confirmation"),
      adaptations: count((ep) => ep.action === "retrain" || ep.action === "switch-mode"),
    };
  });
  return { policy, samples: n, exposure: metrics.runLengths.exposure, falseAlarms: metrics.falseAlarms, events };
}
