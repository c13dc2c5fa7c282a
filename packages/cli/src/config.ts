import { LeewayError, OptionError } from "@leeway/core";
import { CORE_DEFAULTS, DecisionEngine, type DecisionEngineOptions } from "@leeway/policy";
import { locateJsonKey, parseConfigText, validateConfig, type ConfigField, type ConfigObject } from "./config-schema.js";
import { InputError } from "./exit-codes.js";
import type { StreamMode } from "./input/samples.js";

const n = (unit: string, def: number | null, doc: string, extra: { min?: number; max?: number; integer?: boolean } = {}): ConfigField => ({ kind: "number", unit, default: def, doc, ...extra });
const d = CORE_DEFAULTS;
const count = (key: keyof typeof CORE_DEFAULTS, doc: string): ConfigField => n("samples", d[key] as number, doc, { integer: true, min: 0 });
const level = (key: keyof typeof CORE_DEFAULTS, unit: string, doc: string, extra: { integer?: boolean } = {}): ConfigField => n(unit, d[key] as number, doc, extra.integer === true ? { integer: true, min: 0 } : {});
const choice = (key: keyof typeof CORE_DEFAULTS, choices: readonly string[], doc: string): ConfigField => ({ kind: "string", default: d[key] as string, choices, doc });

/**
 * The keys of the `engine` section: the options of the decision engine
 * (`@leeway/policy`), passed on unchanged; the engine checks their ranges.
 * Defaults are the engine's own (`CORE_DEFAULTS`), tuned for 256-bin spectra
 * at one sample per second; the feature-mode defaults are those of its pool.
 */
export const ENGINE_FIELDS: Readonly<Record<string, ConfigField>> = {
  commissioning: count("commissioning", "Samples of the commissioning window, all learnt as normal, before the commissioning reference is frozen."),
  calibration: count("calibration", "Samples after a reference is frozen whose scores calibrate its normal level, its spread and the anomaly threshold."),
  scoreFloor: level("scoreFloor", "score units", "Added to every score before its logarithm is taken (keeps ln finite for a score of 0)."),
  anomalyQuantile: level("anomalyQuantile", "probability", "Quantile of the calibration scores (log scale) the anomaly threshold starts from, in (0.5, 1)."),
  anomalyMargin: level("anomalyMargin", "σ of ln score", "Margin added to that quantile to enter the anomaly state."),
  anomalyExitMargin: level("anomalyExitMargin", "σ of ln score", "Margin below which the anomaly state is left again (hysteresis); at most anomalyMargin."),
  anomalyRun: count("anomalyRun", "Consecutive anomalous samples that raise an alarm with cause anomaly."),
  changeTest: choice("changeTest", ["cusum", "page-hinkley"], "The change test on the active reference's normalised score (two-sided, reference value 0.5 σ)."),
  targetArl0: level("targetArl0", "samples", "Target in-control average run length of the change test; its threshold is calibrated to it at the end of commissioning."),
  calibrationReplicates: count("calibrationReplicates", "Bootstrap replicates of that calibration (cost grows with replicates × targetArl0)."),
  baselineHalfLife: count("baselineHalfLife", "Half-life of the slowly following baseline the change test measures from."),
  scoreClip: level("scoreClip", "σ", "Normalised scores are clipped to ± this before the change test, so one wild sample cannot fire it."),
  settling: count("settling", "Samples the post-change stream must stay stationary before the engine acts."),
  settlingLimit: count("settlingLimit", "Longest settling before an unsettled change raises an alarm."),
  settlingTrendZ: level("settlingTrendZ", "z", "|Mann-Kendall z| over the settling window above which the stream counts as trending."),
  settlingShift: level("settlingShift", "σ", "Largest difference of the settling window's half means still called stationary."),
  settlingOutlier: level("settlingOutlier", "σ of the window", "While settling, a sample whose normalised score lies more than this above the window's level is an anomaly (held, left out of a retrain)."),
  confirmShift: level("confirmShift", "σ", "Smallest settled level shift of the active reference that confirms a change; below it the alarm was a false one."),
  knownModeLevel: level("knownModeLevel", "σ", "A reference whose mean settled score is within this of its own normal level scores the new data as normal (a known mode)."),
  trendBlock: count("trendBlock", "Samples averaged into one point of the long trend windows (decimation)."),
  trendWindow: level("trendWindow", "blocks", "Points (blocks) in the long trend windows.", { integer: true }),
  trendZ: level("trendZ", "z", "One-sided Mann-Kendall z that raises a degradation alarm (p 0.001)."),
  trendWarnZ: level("trendWarnZ", "z", "One-sided Mann-Kendall z at which learning stops and retraining is refused (degradation warning)."),
  trendClearZ: level("trendClearZ", "z", "z below which standing degradation evidence clears (hysteresis)."),
  trendMinRise: level("trendMinRise", "σ", "Smallest rise over the window (Theil-Sen slope × window span) that counts as degradation."),
  trendMinBlocks: level("trendMinBlocks", "blocks", "Smallest window filling before a trend can raise anything.", { integer: true }),
  retrain: choice("retrain", ["auto", "confirm", "never"], "What a confirmed drift that no known mode explains leads to: retrain at once, ask an operator (see operator.confirmAfter), or never (a concept-drift alarm instead)."),
  persistentAnomaly: choice("persistentAnomaly", ["confirm", "as-drift"], "After an acknowledged anomaly alarm whose level persists through settling: confirm asks the operator even under retrain auto; as-drift retrains on it like on any drift (it would learn an hour-long clog acknowledged while it lasts as normal)."),
  retrainBudget: level("retrainBudget", "retrains", "Retrain attempts (failed candidates included) allowed per horizon.", { integer: true }),
  retrainHorizon: count("retrainHorizon", "The horizon of that budget."),
  coolDown: count("coolDown", "Samples after a retrain or a switch in which no further retrain may start."),
  seed: { kind: "seed", default: d.seed, doc: "Seed of the engine's random source (threshold calibration, candidate models): a number or a non-empty string." },
  nonFinite: choice("nonFinite", ["refuse", "skip"], "NaN or ±Infinity in a sample: refuse (the replay stops with an input error naming the line) or skip (counted; decided hold)."),
  hidden: n("units", 32, "Features mode only: hidden units of every autoencoder.", { integer: true, min: 1 }),
  members: n("members", 4, "Features mode only: members of the live pool, one per operating mode.", { integer: true, min: 1 }),
  ridge: n("—", 0.01, "Features mode only: ridge δ of the OS-ELM autoencoders (P₀ = I/δ)."),
  forgetting: n("—", 1, "Features mode only: forgetting factor λ in (0, 1] of the live members."),
  validationShare: n("fraction", 0.2, "Features mode only: share of the settled samples held out to validate a retrained candidate, in (0, 0.5]."),
  validationTolerance: n("ratio", 2, "Features mode only: a candidate passes when its held-out loss is at most this multiple of its training loss (and below the active reference's)."),
};

/** Every key of a pipeline config file. */
export const CONFIG_FIELDS: Readonly<Record<string, ConfigField>> = {
  input: {
    kind: "section",
    doc: "How the input stream is read.",
    fields: {
      mode: { kind: "string", default: "auto", choices: ["auto", "scores", "features"], doc: "auto: one numeric column, or columns score/live and ref…, is scores mode; otherwise every numeric column is a feature." },
      time: { kind: "string", default: "auto", doc: 'The column carried through as time: "auto" (a column named time, timestamp, datetime, date or t), "none", or a column name.' },
      columns: { kind: "strings", default: null, doc: "Only these columns (features mode; in scores mode the one score column). Default: every numeric column." },
      modeColumn: { kind: "string", default: null, doc: "A column naming each record's operating mode (a speed setting, a valve position): one engine per distinct value, each record decided by the engine of its mode. Default: none (one engine)." },
    },
  },
  engine: { kind: "section", doc: "Options of the decision engine (@leeway/policy); absent keys take the engine's defaults.", fields: ENGINE_FIELDS },
  operator: {
    kind: "section",
    doc: "A scripted operator for the replay (nobody is at hand to clear alarms or confirm retrains).",
    fields: {
      acknowledgeAfter: n("samples", null, "Acknowledge an alarm after it has stayed latched this long; null: never (a latched alarm stays latched to the end).", { integer: true, min: 1 }),
      confirmAfter: n("samples", null, 'Confirm a retrain that has awaited confirmation this long (engine.retrain "confirm"); null: never.', { integer: true, min: 1 }),
    },
  },
  report: {
    kind: "section",
    doc: "The HTML report written with --out.",
    fields: {
      title: { kind: "string", default: "leeway replay", doc: "Heading of the report." },
      columns: n("columns", 1200, "Plot columns the decisions are decimated to (min/max per column).", { integer: true, min: 64, max: 8192 }),
    },
  },
};

/** A validated pipeline config. */
export interface PipelineConfig {
  input: { mode: "auto" | StreamMode; time: string | null | undefined; columns: readonly string[] | undefined; modeColumn: string | null };
  /** Engine options given in the file (absent keys are left to the engine's defaults). */
  engine: DecisionEngineOptions;
  operator: { acknowledgeAfter: number | null; confirmAfter: number | null };
  report: { title: string; columns: number };
  /** The file's text and name, to place engine errors. */
  source: { file: string; text: string } | null;
}

/** The config used when no --config is given. */
export function defaultConfig(): PipelineConfig {
  return fromValidated(validateConfig({}, CONFIG_FIELDS, "(defaults)", () => "1:1"), null);
}

/**
 * Parses and validates a pipeline config (JSON). Unknown keys are named with
 * the nearest known key suggested; wrong types and values are named with
 * what is allowed; every message starts with file:line:column.
 */
export function parseConfig(text: string, file: string): PipelineConfig {
  const raw = parseConfigText(text, file);
  const valid = validateConfig(raw, CONFIG_FIELDS, file, (path) => locateJsonKey(text, path));
  return fromValidated(valid, { file, text });
}

function fromValidated(v: ConfigObject, source: { file: string; text: string } | null): PipelineConfig {
  const input = v.input as ConfigObject;
  const engine = v.engine as ConfigObject;
  const report = v.report as ConfigObject;
  const operator = v.operator as ConfigObject;
  const given: Record<string, unknown> = {};
  const raw = source === null ? {} : ((JSON.parse(source.text) as { engine?: Record<string, unknown> }).engine ?? {});
  for (const key of Object.keys(ENGINE_FIELDS)) if (raw[key] !== undefined && raw[key] !== null) given[key] = engine[key];
  const time = input.time as string;
  return {
    input: {
      mode: input.mode as "auto" | StreamMode,
      time: time === "auto" ? undefined : time === "none" ? null : time,
      columns: (input.columns as readonly string[] | null) ?? undefined,
      modeColumn: input.modeColumn as string | null,
    },
    engine: given as DecisionEngineOptions,
    operator: { acknowledgeAfter: operator.acknowledgeAfter as number | null, confirmAfter: operator.confirmAfter as number | null },
    report: { title: report.title as string, columns: report.columns as number },
    source,
  };
}

/**
 * Builds the decision engine from the config's engine options (plus `inputs`
 * in features mode). An option the engine refuses becomes an input error
 * placed at the key in the config file.
 */
export function buildEngine(config: PipelineConfig, inputs: number | null): DecisionEngine {
  const options: DecisionEngineOptions = { ...config.engine };
  if (inputs !== null) options.inputs = inputs;
  try {
    return new DecisionEngine(options);
  } catch (error) {
    if (error instanceof OptionError && config.source !== null) {
      const at = locateJsonKey(config.source.text, ["engine", error.option]);
      throw new InputError(`${config.source.file}:${at}: engine.${error.option}: ${error.message}`);
    }
    if (error instanceof LeewayError) throw new InputError(`engine options: ${error.message}`);
    throw error;
  }
}
