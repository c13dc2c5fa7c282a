import { OptionError, optionTable, samplePeriodOption, type OptionDescription, type ResolvedOptions } from "@leeway/core";
import { MAX_HIDDEN, MAX_MEMBERS } from "@leeway/pool";

/** How the engine answers a confirmed concept drift that no known mode explains. */
export type RetrainMode = "auto" | "confirm" | "never";

/**
 * What a settled level needs after an acknowledged anomaly alarm when it
 * persists at the anomaly's height: "confirm" asks the operator
 * ("await-confirmation"), "as-drift" treats it as any concept drift (the
 * retrain mode decides; with "auto" it is retrained on without asking).
 */
export type PersistentAnomalyMode = "confirm" | "as-drift";

/** Which change test watches the active reference's normalised score. */
export type ChangeTestChoice = "cusum" | "page-hinkley" | "martingale";

/** Whether someone answers the engine's alarms and questions. */
export type Attendance = "attended" | "unattended";

const MAX_SAMPLES = 2 ** 31 - 1;

/**
 * The options of the decision core, shared by both feeding modes, declared
 * once: defaults, bounds, units and docs (the CLI's config schema and the
 * policy guide are derived from this table). Spans take a count of samples
 * or a duration ("15m", "4h") turned into samples by `samplePeriod`; the
 * defaults are durations with a floor in samples. Every level written "σ" is
 * in standard deviations of the natural log of a score, measured during
 * calibration.
 */
export const CORE_OPTIONS = optionTable("DecisionEngine", {
  commissioning: { kind: "span", default: "10m", atLeast: 100, min: 10, max: MAX_SAMPLES, doc: "Span of a new engine's commissioning window, all learnt as normal, before the commissioning reference is frozen." },
  calibration: { kind: "span", default: "10m", atLeast: 100, min: 20, max: 100_000, doc: "Span after a reference is frozen whose scores calibrate its normal level, its spread and the anomaly threshold." },
  scoreFloor: { kind: "number", default: 1e-12, min: 0, minExclusive: true, unit: "score units", doc: "Added to every score before its logarithm is taken (keeps ln finite for a score of 0)." },
  anomalyQuantile: { kind: "number", default: 0.99, min: 0.5, max: 1, minExclusive: true, maxExclusive: true, unit: "probability", doc: "Quantile of the calibration live scores (log scale) the anomaly threshold starts from." },
  anomalyMargin: { kind: "number", default: 1, min: 0, minExclusive: true, unit: "σ", doc: "Margin added to that quantile to enter the anomaly state." },
  anomalyExitMargin: { kind: "number", default: 0, min: 0, unit: "σ", doc: "Margin below which the anomaly state is left again (hysteresis); at most anomalyMargin." },
  anomalyRun: { kind: "integer", default: 5, min: 1, max: 100_000, unit: "samples", doc: "Consecutive anomalous samples that raise an alarm with cause anomaly." },
  anomalyExcess: { kind: "number", default: 3, min: 0, max: 1000, unit: "σ", doc: "An episode also raises the alarm before anomalyRun samples when its samples together lie this far above the entry threshold: Σ (u − u_enter)/σ (one sample 3σ past it, or three 1σ past it); 0: only the run counts." },
  changeTest: { kind: "choice", default: "cusum", choices: ["cusum", "page-hinkley", "martingale"], doc: "The change test on the active reference's normalised score: cusum or page-hinkley (two-sided, reference value 0.5 σ, threshold calibrated to targetArl0), or martingale (a two-sided conformal test martingale with threshold martingaleThreshold: on an exchangeable in-control stream a false alarm between two restarts has probability at most 1/martingaleThreshold, with no calibration run; slower to detect)." },
  martingaleThreshold: { kind: "number", default: 100, min: 1, max: 1e12, minExclusive: true, unit: "ratio", doc: "changeTest martingale only: the level λ of the martingale that signals a change; by Ville's inequality a false alarm between two restarts has probability at most 1/λ (100: 1 %). Higher is slower to detect." },
  targetArl0: { kind: "number", default: 20000, min: 100, max: 1e7, unit: "samples", doc: "Target in-control average run length of the change test; its threshold is calibrated to it at the end of commissioning (not used by the martingale)." },
  calibrationReplicates: { kind: "integer", default: 100, min: 10, max: 10_000, unit: "replicates", doc: "Bootstrap replicates of that calibration (cost grows with replicates; not used by the martingale)." },
  baselineHalfLife: { kind: "span", default: "30m", atLeast: 30, min: 1, max: MAX_SAMPLES, doc: "Half-life of the slowly following baseline the change test measures from." },
  scoreClip: { kind: "number", default: 6, min: 0, minExclusive: true, unit: "σ", doc: "Normalised scores are clipped to ± this before the change test, so one wild sample cannot fire it." },
  settling: { kind: "span", default: "15m", atLeast: 30, min: 20, max: 100_000, doc: "Span the post-change stream must stay stationary before the engine acts (longer than the transients that must not be learnt)." },
  settlingLimit: { kind: "span", default: "1h", atLeast: 120, min: 20, max: MAX_SAMPLES, doc: "Longest settling before an unsettled change raises an alarm; at least settling." },
  settlingTrendZ: { kind: "number", default: 2.58, min: 0, minExclusive: true, unit: "z", doc: "|Mann-Kendall z| over the settling window above which the stream counts as trending (two-sided p 0.01)." },
  settlingShift: { kind: "number", default: 0.5, min: 0, minExclusive: true, unit: "σ", doc: "Largest difference of the settling window's half means still called stationary." },
  settlingOutlier: { kind: "number", default: 4, min: 0, minExclusive: true, unit: "σ of the window", doc: "While settling, a sample whose normalised score lies more than this above the window's level is an anomaly (held, left out of a retrain)." },
  confirmShift: { kind: "number", default: 1, min: 0, minExclusive: true, unit: "σ", doc: "Smallest settled level shift of the active reference that confirms a change; below it the alarm was a false one." },
  knownModeLevel: { kind: "number", default: 1, min: 0, minExclusive: true, unit: "σ", doc: "A reference whose mean settled score is within this of its own normal level scores the new data as normal (a known mode)." },
  trendBlock: { kind: "span", default: "1m", atLeast: 24, min: 1, max: 1_000_000, doc: "Span averaged into one point of the long trend windows (decimation)." },
  trendWindow: { kind: "integer", default: 240, min: 10, max: 100_000, unit: "blocks", doc: "Points (blocks) in the long trend windows (4 h at 1 Hz with blocks of 1 min)." },
  trendZ: { kind: "number", default: 3.09, min: 0, minExclusive: true, unit: "z", doc: "One-sided Mann-Kendall z that raises a degradation alarm (p 0.001)." },
  trendWarnZ: { kind: "number", default: 2.33, min: 0, minExclusive: true, unit: "z", doc: "One-sided Mann-Kendall z at which learning stops and retraining is refused (degradation warning, p 0.01); at most trendZ." },
  trendClearZ: { kind: "number", default: 1.64, min: 0, unit: "z", doc: "z below which standing degradation evidence clears (hysteresis); at most trendWarnZ." },
  trendMinRise: { kind: "number", default: 0.5, min: 0, unit: "σ", doc: "Smallest rise over the window (Theil-Sen slope × window span) that counts as degradation." },
  trendMinBlocks: { kind: "integer", default: 20, min: 3, max: MAX_SAMPLES, unit: "blocks", doc: "Smallest window filling before a trend can raise anything; at most trendWindow." },
  limit: { kind: "number", default: 0, min: 0, unit: "score units", doc: "A score level of the active reference whose time to be reached is estimated from the degradation trend window, once per trend block, and put in the evidence of every degradation decision (evidence.limit: expected samples and a 90 % interval from the current sample, in seconds too when samplePeriod is given, or the reason for refusing); 0: no limit. It changes no decision." },
  retrain: { kind: "choice", default: "auto", choices: ["auto", "confirm", "never"], doc: "What a confirmed drift that no known mode explains leads to: retrain at once, ask an operator, or never (a concept-drift alarm instead)." },
  persistentAnomaly: { kind: "choice", default: "confirm", choices: ["confirm", "as-drift"], doc: "After an acknowledged anomaly alarm whose level persists through settling: confirm asks the operator even under retrain auto; as-drift retrains on it like on any drift (it would learn an hour-long clog acknowledged while it lasts as normal)." },
  attendance: { kind: "choice", default: "attended", choices: ["attended", "unattended"], doc: "attended: someone answers alarms (acknowledge) and questions; unattended: nobody does, so an alarm is reported once, an anomaly's latch clears itself after latchClear of normal scores, a concept-drift latch accepts the level after latchClear, a degradation latch holds until the next commissioning, and no question is asked (a settled change without a fault's signature retrains by itself, one with it raises an anomaly alarm). Refused with retrain confirm." },
  latchClear: { kind: "span", default: "15m", atLeast: 30, min: 1, max: MAX_SAMPLES, doc: "Unattended only: span of normal scores after which an anomaly's latch clears itself (and after which a concept-drift latch accepts the new level)." },
  reminder: { kind: "span", default: "4h", atLeast: 24, min: 0, max: MAX_SAMPLES, doc: "Attended only: span after which an alarm nobody acknowledged is raised again as a reminder (evidence.reminder counts them); 0: never." },
  realarmFactor: { kind: "number", default: 10, min: 1, minExclusive: true, unit: "ratio", doc: "After an anomaly or degradation alarm was acknowledged, a new alarm of the same cause is raised only when the active reference's score is this many times the score at that alarm; until then the event is the same one (held, not paged)." },
  featureSignature: { kind: "choice", default: "evidence", choices: ["evidence", "rules"], doc: "Feature mode: evidence reports which features carry a deviation; rules also lets a broadband deviation settle as a change of conditions instead of alarming (off by default: on the CWRU records an inner-race fault reads as broadband and would be settled on and learnt)." },
  broadbandSpread: { kind: "number", default: 0.3, min: 0, max: 1, minExclusive: true, unit: "ratio", doc: "Feature signature: smallest participation ratio of a deviation's energy over the features for it to count as broadband (a change of conditions, not a fault's lines)." },
  broadbandLocality: { kind: "number", default: 0.5, min: 0, max: 1, minExclusive: true, unit: "share", doc: "Feature signature: largest share of a deviation's energy in a run of a quarter of the features (features ordered, as spectrum bands by frequency) for it to count as broadband." },
  signatureStrength: { kind: "number", default: 4, min: 0, minExclusive: true, unit: "ratio", doc: "Feature signature: smallest excess energy of a deviation, as a multiple of what noise alone gives, for its shape to be judged at all." },
  retrainBudget: { kind: "integer", default: 3, min: 0, max: 1_000_000, unit: "retrains", doc: "Retrain attempts (failed candidates included) allowed per horizon." },
  retrainHorizon: { kind: "span", default: "1d", atLeast: 144, min: 1, max: MAX_SAMPLES, doc: "The horizon of that budget." },
  coolDown: { kind: "span", default: "30m", atLeast: 10, min: 0, max: MAX_SAMPLES, doc: "Span after a retrain or a switch in which no further retrain may start." },
  seed: { kind: "seed", default: 0, doc: "Seed of the engine's random source (threshold calibration, candidate models): a number or a non-empty string." },
  nonFinite: { kind: "choice", default: "refuse", choices: ["refuse", "skip"], doc: "NaN or ±Infinity in a sample: refuse (E_NON_FINITE) or skip (counted; decided hold)." },
});

/**
 * The options of feature mode (the engine's own autoencoder pool), declared
 * once; refused in score-only mode. Bounds follow the pool's own limits.
 */
export const FEATURE_OPTIONS = optionTable("DecisionEngine", {
  hidden: { kind: "integer", default: 32, min: 1, max: MAX_HIDDEN, unit: "units", doc: "Feature mode only: hidden units of every autoencoder (live members and candidates)." },
  members: { kind: "integer", default: 4, min: 1, max: MAX_MEMBERS, unit: "members", doc: "Feature mode only: members of the live pool, one per operating mode." },
  ridge: { kind: "number", default: 0.01, min: 0, minExclusive: true, unit: "—", doc: "Feature mode only: ridge δ of the OS-ELM autoencoders (P₀ = I/δ)." },
  forgetting: { kind: "number", default: 1, min: 0, max: 1, minExclusive: true, unit: "—", doc: "Feature mode only: forgetting factor λ in (0, 1] of the live members (1: remember every learnt sample equally)." },
  validationShare: { kind: "number", default: 0.2, min: 0, max: 0.5, minExclusive: true, unit: "fraction", doc: "Feature mode only: share of the settled samples held out to validate a retrained candidate." },
  validationTolerance: { kind: "number", default: 2, min: 1, unit: "ratio", doc: "Feature mode only: a candidate passes when its held-out loss is at most this multiple of its training loss (and below the active reference's)." },
});

/**
 * The validated, complete option set of the core (plain data; it travels in
 * snapshots); spans in samples. `samplePeriod` is the engine's, in seconds,
 * or null when it was not given (evidence then counts in samples only).
 */
export type CoreSettings = ResolvedOptions<typeof CORE_OPTIONS.rows> & { changeTest: ChangeTestChoice; retrain: RetrainMode; persistentAnomaly: PersistentAnomalyMode; attendance: Attendance; featureSignature: "evidence" | "rules"; nonFinite: "refuse" | "skip"; samplePeriod: number | null };

/** The options the core accepts: each as in {@link CORE_OPTIONS}; spans as a count of samples or a duration such as "15m". */
export type DecisionCoreOptions = { [K in keyof CoreSettings]?: CoreSettings[K] | (K extends SpanName ? string : never) };

type SpanName = { [K in keyof typeof CORE_OPTIONS.rows]: (typeof CORE_OPTIONS.rows)[K] extends { kind: "span" } ? K : never }[keyof typeof CORE_OPTIONS.rows];

/** The validated feature-mode options. */
export type FeatureOptionSettings = ResolvedOptions<typeof FEATURE_OPTIONS.rows>;

/** Options of the feature mode (ignored keys are refused in score-only mode); see {@link FEATURE_OPTIONS}. */
export type FeatureModelOptions = Partial<FeatureOptionSettings>;

/** The option names of the core, in table order (`samplePeriod` is the engine's own, kept beside them). */
export const CORE_OPTION_NAMES = CORE_OPTIONS.names;

/** The core's defaults at one sample per second. */
export const CORE_DEFAULTS: Readonly<CoreSettings> = Object.freeze({ ...(CORE_OPTIONS.defaults() as Omit<CoreSettings, "samplePeriod">), samplePeriod: null });

/** Every engine option as plain rows (the two tables and `inputs`, `samplePeriod`), for docs and config schemas. */
export function describeEngineOptions(): OptionDescription[] {
  return [
    { name: "samplePeriod", kind: "number", default: 1, min: null, max: null, choices: null, unit: "s", allowed: 'a number of seconds > 0, or a duration such as "10m"', doc: 'Seconds between samples, or a duration such as "10m"; spans given as durations are turned into samples with it.' },
    ...CORE_OPTIONS.describe(),
    ...FEATURE_OPTIONS.describe(),
  ];
}

/**
 * Validates the core's options (missing ones take their defaults at
 * `samplePeriod`, 1 s when null: not given); throws OptionError naming the option.
 */
export function resolveCoreSettings(component: string, options: Readonly<Record<string, unknown>>, samplePeriod: number | null): CoreSettings {
  const s = { ...(CORE_OPTIONS.resolve(options, { samplePeriod: samplePeriod ?? 1 }) as Omit<CoreSettings, "samplePeriod">), samplePeriod };
  if (s.anomalyExitMargin > s.anomalyMargin) throw new OptionError(component, "anomalyExitMargin", s.anomalyExitMargin, `a number in [0, anomalyMargin = ${s.anomalyMargin}]`);
  if (s.settlingLimit < s.settling) throw new OptionError(component, "settlingLimit", s.settlingLimit, `an integer >= settling = ${s.settling}`);
  if (s.trendWarnZ > s.trendZ) throw new OptionError(component, "trendWarnZ", s.trendWarnZ, `a number in (0, trendZ = ${s.trendZ}]`);
  if (s.trendClearZ > s.trendWarnZ) throw new OptionError(component, "trendClearZ", s.trendClearZ, `a number in [0, trendWarnZ = ${s.trendWarnZ}]`);
  if (s.attendance === "unattended" && s.retrain === "confirm") throw new OptionError(component, "retrain", s.retrain, 'auto or never with attendance "unattended" (nobody answers a question)');
  if (s.trendMinBlocks > s.trendWindow) throw new OptionError(component, "trendMinBlocks", s.trendMinBlocks, `an integer in [3, trendWindow = ${s.trendWindow}]`);
  return s;
}

/** Reads `samplePeriod` (seconds or a duration), or null when it is not given. */
export function resolveSamplePeriod(component: string, value: unknown): number | null {
  return value === undefined ? null : samplePeriodOption(component, "samplePeriod", value);
}
