import {
  integerInRange,
  nonFiniteOption,
  numberInRange,
  oneOf,
  OptionError,
  positiveNumber,
  seedOption,
  type NonFinitePolicy,
} from "@leeway/core";

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
export type ChangeTestChoice = "cusum" | "page-hinkley";

/**
 * Options of the decision core, shared by both feeding modes. Every count is in
 * samples (at one sample per second, seconds); every level written "σ" is in
 * standard deviations of the natural log of a score, measured during calibration.
 */
export interface DecisionCoreOptions {
  /** Samples of a new engine's commissioning window, all learnt as normal, before the commissioning reference is frozen. Default 600 (10 min at 1 Hz). */
  commissioning?: number;
  /** Samples after a reference is frozen whose scores calibrate its normal level, spread and the anomaly threshold. Default 600 (10 min at 1 Hz). */
  calibration?: number;
  /** Added to every score before its logarithm is taken, in score units (keeps ln finite for a score of 0). Default 1e-12. */
  scoreFloor?: number;
  /** Quantile of the calibration live scores (log scale) the anomaly threshold starts from, in (0.5, 1). Default 0.99. */
  anomalyQuantile?: number;
  /** Margin added to that quantile to enter the anomaly state, in σ. Default 1. */
  anomalyMargin?: number;
  /** Margin below which the anomaly state is left again (hysteresis), in σ; at most `anomalyMargin`. Default 0 (the quantile itself). */
  anomalyExitMargin?: number;
  /** Consecutive anomalous samples that raise an alarm with cause "anomaly". Default 5. */
  anomalyRun?: number;
  /** The change test on the active reference's normalised score. Default "cusum" (two-sided, reference value 0.5 σ). */
  changeTest?: ChangeTestChoice;
  /** Target in-control average run length of the change test, in samples; the threshold is calibrated to it at the end of commissioning. Default 20000. */
  targetArl0?: number;
  /** Bootstrap replicates of that calibration, 10 to 10000 (cost grows with replicates). Default 100. */
  calibrationReplicates?: number;
  /** Half-life of the slowly following baseline the change test measures from, in samples. Default 1800 (30 min at 1 Hz). */
  baselineHalfLife?: number;
  /** Normalised scores are clipped to ±this before the change test, in σ, so that one wild sample cannot fire it. Default 6. */
  scoreClip?: number;
  /** Samples the post-change stream must stay stationary before the engine acts. Default 900 (15 min at 1 Hz: longer than the transients that must not be learnt). */
  settling?: number;
  /** Longest settling before an unsettled change raises an alarm, in samples. Default 3600. */
  settlingLimit?: number;
  /** |Mann-Kendall z| over the settling window above which the stream counts as trending. Default 2.58 (two-sided p 0.01). */
  settlingTrendZ?: number;
  /** Largest difference of the settling window's half means still called stationary, in σ. Default 0.5. */
  settlingShift?: number;
  /** While settling, a sample whose normalised active score lies more than this above the window's level is an anomaly (held, left out), in σ of the window. Default 4. */
  settlingOutlier?: number;
  /** Smallest settled level shift of the active reference that confirms a change, in σ; below it the alarm was a false one. Default 1. */
  confirmShift?: number;
  /** A reference whose mean settled score is within this of its own normal level scores the new data as normal (a known mode), in σ. Default 1. */
  knownModeLevel?: number;
  /** Samples averaged into one point of the long trend windows (decimation). Default 60. */
  trendBlock?: number;
  /** Points (blocks) in the long trend windows. Default 240 (4 h at 1 Hz with blocks of 60). */
  trendWindow?: number;
  /** One-sided Mann-Kendall z that raises a degradation alarm. Default 3.09 (p 0.001). */
  trendZ?: number;
  /** One-sided Mann-Kendall z at which learning stops and retraining is refused (degradation warning). Default 2.33 (p 0.01). */
  trendWarnZ?: number;
  /** z below which standing degradation evidence clears (hysteresis). Default 1.64. */
  trendClearZ?: number;
  /** Smallest rise over the window (Theil-Sen slope × window span) that counts as degradation, in σ. Default 0.5. */
  trendMinRise?: number;
  /** Smallest window filling, in blocks, before a trend can raise anything. Default 20. */
  trendMinBlocks?: number;
  /** What a confirmed drift that no known mode explains leads to. Default "auto". */
  retrain?: RetrainMode;
  /**
   * After an acknowledged anomaly alarm whose level persists through settling (the settled level of the
   * active reference at or above the anomaly exit threshold): "confirm" (default) asks the operator even
   * when `retrain` is "auto"; "as-drift" retrains on it like on any drift. "as-drift" learns a fault that
   * is acknowledged while it lasts (an hour-long clog) as the new normal: use it only where every
   * acknowledged alarm has been inspected and cleared. Default "confirm".
   */
  persistentAnomaly?: PersistentAnomalyMode;
  /** Retrain attempts (a candidate that fails validation counts too) allowed per horizon. Default 3. */
  retrainBudget?: number;
  /** The horizon of that budget, in samples. Default 86400 (a day at 1 Hz). */
  retrainHorizon?: number;
  /** Samples after a retrain or a switch in which no further retrain may start. Default 1800. */
  coolDown?: number;
  /** Seed of the engine's random source (threshold calibration, candidate models). Default 0. */
  seed?: number | string;
  /** NaN or ±Infinity in a sample: "refuse" (default) throws E_NON_FINITE, "skip" counts it and decides "hold". */
  nonFinite?: NonFinitePolicy;
}

/** The validated, complete option set of the core (plain data; it travels in snapshots). */
export interface CoreSettings {
  commissioning: number;
  calibration: number;
  scoreFloor: number;
  anomalyQuantile: number;
  anomalyMargin: number;
  anomalyExitMargin: number;
  anomalyRun: number;
  changeTest: ChangeTestChoice;
  targetArl0: number;
  calibrationReplicates: number;
  baselineHalfLife: number;
  scoreClip: number;
  settling: number;
  settlingLimit: number;
  settlingTrendZ: number;
  settlingShift: number;
  settlingOutlier: number;
  confirmShift: number;
  knownModeLevel: number;
  trendBlock: number;
  trendWindow: number;
  trendZ: number;
  trendWarnZ: number;
  trendClearZ: number;
  trendMinRise: number;
  trendMinBlocks: number;
  retrain: RetrainMode;
  persistentAnomaly: PersistentAnomalyMode;
  retrainBudget: number;
  retrainHorizon: number;
  coolDown: number;
  seed: number | string;
  nonFinite: NonFinitePolicy;
}

/** The option names of the core, in a fixed order. */
export const CORE_OPTION_NAMES = [
  "commissioning",
  "calibration",
  "scoreFloor",
  "anomalyQuantile",
  "anomalyMargin",
  "anomalyExitMargin",
  "anomalyRun",
  "changeTest",
  "targetArl0",
  "calibrationReplicates",
  "baselineHalfLife",
  "scoreClip",
  "settling",
  "settlingLimit",
  "settlingTrendZ",
  "settlingShift",
  "settlingOutlier",
  "confirmShift",
  "knownModeLevel",
  "trendBlock",
  "trendWindow",
  "trendZ",
  "trendWarnZ",
  "trendClearZ",
  "trendMinRise",
  "trendMinBlocks",
  "retrain",
  "persistentAnomaly",
  "retrainBudget",
  "retrainHorizon",
  "coolDown",
  "seed",
  "nonFinite",
] as const;

/** The defaults, tuned for 256-bin spectra at one sample per second. */
export const CORE_DEFAULTS: Readonly<CoreSettings> = Object.freeze({
  commissioning: 600,
  calibration: 600,
  scoreFloor: 1e-12,
  anomalyQuantile: 0.99,
  anomalyMargin: 1,
  anomalyExitMargin: 0,
  anomalyRun: 5,
  changeTest: "cusum",
  targetArl0: 20000,
  calibrationReplicates: 100,
  baselineHalfLife: 1800,
  scoreClip: 6,
  settling: 900,
  settlingLimit: 3600,
  settlingTrendZ: 2.58,
  settlingShift: 0.5,
  settlingOutlier: 4,
  confirmShift: 1,
  knownModeLevel: 1,
  trendBlock: 60,
  trendWindow: 240,
  trendZ: 3.09,
  trendWarnZ: 2.33,
  trendClearZ: 1.64,
  trendMinRise: 0.5,
  trendMinBlocks: 20,
  retrain: "auto",
  persistentAnomaly: "confirm",
  retrainBudget: 3,
  retrainHorizon: 86400,
  coolDown: 1800,
  seed: 0,
  nonFinite: "refuse",
});

const MAX_SAMPLES = 2 ** 31 - 1;

/** Validates the core's options (missing ones take {@link CORE_DEFAULTS}); throws OptionError naming the option. */
export function resolveCoreSettings(component: string, options: DecisionCoreOptions): CoreSettings {
  const d = CORE_DEFAULTS;
  const pick = <K extends keyof CoreSettings>(key: K): unknown => (options[key] === undefined ? d[key] : options[key]);
  const count = (key: keyof CoreSettings, min: number, max = MAX_SAMPLES): number => integerInRange(component, key, pick(key), min, max);
  const level = (key: keyof CoreSettings): number => positiveNumber(component, key, pick(key));
  const s: CoreSettings = {
    commissioning: count("commissioning", 10),
    calibration: count("calibration", 20, 100_000),
    scoreFloor: level("scoreFloor"),
    anomalyQuantile: numberInRange(component, "anomalyQuantile", pick("anomalyQuantile"), { min: 0.5, max: 1, minExclusive: true, maxExclusive: true }),
    anomalyMargin: level("anomalyMargin"),
    anomalyExitMargin: numberInRange(component, "anomalyExitMargin", pick("anomalyExitMargin"), { min: 0 }),
    anomalyRun: count("anomalyRun", 1, 100_000),
    changeTest: oneOf(component, "changeTest", pick("changeTest"), ["cusum", "page-hinkley"] as const),
    targetArl0: numberInRange(component, "targetArl0", pick("targetArl0"), { min: 100, max: 1e7 }),
    calibrationReplicates: count("calibrationReplicates", 10, 10_000), // calibrateThreshold needs at least 10
    baselineHalfLife: positiveNumber(component, "baselineHalfLife", pick("baselineHalfLife")),
    scoreClip: level("scoreClip"),
    settling: count("settling", 20, 100_000),
    settlingLimit: count("settlingLimit", 20),
    settlingTrendZ: level("settlingTrendZ"),
    settlingShift: level("settlingShift"),
    settlingOutlier: level("settlingOutlier"),
    confirmShift: level("confirmShift"),
    knownModeLevel: level("knownModeLevel"),
    trendBlock: count("trendBlock", 1, 1_000_000),
    trendWindow: count("trendWindow", 10, 100_000),
    trendZ: level("trendZ"),
    trendWarnZ: level("trendWarnZ"),
    trendClearZ: numberInRange(component, "trendClearZ", pick("trendClearZ"), { min: 0 }),
    trendMinRise: numberInRange(component, "trendMinRise", pick("trendMinRise"), { min: 0 }),
    trendMinBlocks: count("trendMinBlocks", 3),
    retrain: oneOf(component, "retrain", pick("retrain"), ["auto", "confirm", "never"] as const),
    persistentAnomaly: oneOf(component, "persistentAnomaly", pick("persistentAnomaly"), ["confirm", "as-drift"] as const),
    retrainBudget: count("retrainBudget", 0, 1_000_000),
    retrainHorizon: count("retrainHorizon", 1),
    coolDown: count("coolDown", 0),
    seed: seedOption(component, "seed", pick("seed")),
    nonFinite: nonFiniteOption(component, options.nonFinite),
  };
  if (s.anomalyExitMargin > s.anomalyMargin) {
    throw new OptionError(component, "anomalyExitMargin", s.anomalyExitMargin, `a number in [0, anomalyMargin = ${s.anomalyMargin}]`);
  }
  if (s.settlingLimit < s.settling) throw new OptionError(component, "settlingLimit", s.settlingLimit, `an integer >= settling = ${s.settling}`);
  if (s.trendWarnZ > s.trendZ) throw new OptionError(component, "trendWarnZ", s.trendWarnZ, `a number in (0, trendZ = ${s.trendZ}]`);
  if (s.trendClearZ > s.trendWarnZ) throw new OptionError(component, "trendClearZ", s.trendClearZ, `a number in [0, trendWarnZ = ${s.trendWarnZ}]`);
  if (s.trendMinBlocks > s.trendWindow) throw new OptionError(component, "trendMinBlocks", s.trendMinBlocks, `an integer in [3, trendWindow = ${s.trendWindow}]`);
  return s;
}

/** Reads the core options out of a larger options object (used by the engine). */
export function coreOptionsOf(options: Record<string, unknown>): DecisionCoreOptions {
  const out: Record<string, unknown> = {};
  for (const key of CORE_OPTION_NAMES) if (options[key] !== undefined) out[key] = options[key];
  return out as DecisionCoreOptions;
}

