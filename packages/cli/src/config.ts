import { LeewayError, OptionError } from "@leeway/core";
import { DecisionEngine, type DecisionEngineOptions } from "@leeway/policy";
import { locateJsonKey, parseConfigText, validateConfig, type ConfigField, type ConfigObject } from "./config-schema.js";
import { InputError } from "./exit-codes.js";
import type { StreamMode } from "./input/samples.js";

const n = (unit: string, def: number | null, doc: string, extra: { min?: number; max?: number; integer?: boolean } = {}): ConfigField => ({ kind: "number", unit, default: def, doc, ...extra });
const count = (def: number, doc: string): ConfigField => n("samples", def, doc, { integer: true, min: 0 });

/**
 * The keys of the `engine` section: the options of the decision engine
 * (`@leeway/policy`), passed on unchanged; the engine checks their ranges.
 * Defaults are the engine's, tuned for 256-bin spectra at one sample per second.
 */
export const ENGINE_FIELDS: Readonly<Record<string, ConfigField>> = {
  commissioning: count(600, "Samples of the commissioning window, all learnt as normal, before the commissioning reference is frozen."),
  calibration: count(300, "Samples after a reference is frozen whose scores calibrate its normal level, its spread and the anomaly threshold."),
  scoreFloor: n("score units", 1e-12, "Added to every score before its logarithm is taken (keeps ln finite for a score of 0)."),
  anomalyQuantile: n("probability", 0.995, "Quantile of the calibration scores (log scale) the anomaly threshold starts from, in (0.5, 1)."),
  anomalyMargin: n("σ of ln score", 3, "Margin added to that quantile to enter the anomaly state."),
  anomalyExitMargin: n("σ of ln score", 1.5, "Margin below which the anomaly state is left again (hysteresis); at most anomalyMargin."),
  anomalyRun: count(5, "Consecutive anomalous samples that raise an alarm with cause anomaly."),
  changeTest: { kind: "string", default: "cusum", choices: ["cusum", "page-hinkley"], doc: "The change test on the active reference's normalised score (two-sided, reference value 0.5 σ)." },
  targetArl0: n("samples", 20000, "Target in-control average run length of the change test; its threshold is calibrated to it at the end of commissioning."),
  calibrationReplicates: count(40, "Bootstrap replicates of that calibration (cost grows with replicates × targetArl0)."),
  baselineHalfLife: count(1800, "Half-life of the slowly following baseline the change test measures from."),
  scoreClip: n("σ", 6, "Normalised scores are clipped to ± this before the change test, so one wild sample cannot fire it."),
  settling: count(300, "Samples the post-change stream must stay stationary before the engine acts."),
  settlingLimit: count(3600, "Longest settling before an unsettled change raises an alarm."),
  settlingTrendZ: n("z", 2.58, "|Mann-Kendall z| over the settling window above which the stream counts as trending."),
  settlingShift: n("σ", 0.5, "Largest difference of the settling window's half means still called stationary."),
  settlingOutlier: n("σ of the window", 4, "While settling, a sample whose normalised score lies more than this above the window's level is an anomaly (held, left out of a retrain)."),
  confirmShift: n("σ", 1, "Smallest settled level shift of the active reference that confirms a change; below it the alarm was a false one."),
  knownModeLevel: n("σ", 1, "A reference whose mean settled score is within this of its own normal level scores the new data as normal (a known mode)."),
  trendBlock: count(60, "Samples averaged into one point of the long trend windows (decimation)."),
  trendWindow: n("blocks", 240, "Points (blocks) in the long trend windows.", { integer: true, min: 0 }),
  trendZ: n("z", 3.09, "One-sided Mann-Kendall z that raises a degradation alarm (p 0.001)."),
  trendWarnZ: n("z", 2.33, "One-sided Mann-Kendall z at which learning stops and retraining is refused (degradation warning)."),
  trendClearZ: n("z", 1.64, "z below which standing degradation evidence clears (hysteresis)."),
  trendMinRise: n("σ", 0.5, "Smallest rise over the window (Theil-Sen slope × window span) that counts as degradation."),
  trendMinBlocks: n("blocks", 20, "Smallest window filling before a trend can raise anything.", { integer: true, min: 0 }),
  retrain: { kind: "string", default: "auto", choices: ["auto", "confirm", "never"], doc: "What a confirmed drift that no known mode explains leads to: retrain at once, ask an operator (replay has none: the request stands), or never." },
  retrainBudget: n("retrains", 3, "Retrains allowed per horizon.", { integer: true, min: 0 }),
  retrainHorizon: count(86400, "The horizon of that budget."),
  coolDown: count(1800, "Samples after a retrain or a switch in which no further retrain may start."),
  seed: n("—", 0, "Seed of the engine's random source (threshold calibration, candidate models)."),
  nonFinite: { kind: "string", default: "refuse", choices: ["refuse", "skip"], doc: "NaN or ±Infinity in a sample: refuse (the replay stops with an input error naming the line) or skip (counted; decided hold)." },
  hidden: n("units", 32, "Features mode only: hidden units of every autoencoder.", { integer: true, min: 1 }),
  members: n("members", 4, "Features mode only: members of the live pool, one per operating mode.", { integer: true, min: 1 }),
  ridge: n("—", 0.01, "Features mode only: ridge δ of the OS-ELM autoencoders (P₀ = I/δ)."),
  forgetting: n("—", 1, "Features mode only: forgetting factor λ in (0, 1] of the live members."),
  validationShare: n("fraction", 0.2, "Features mode only: share of the settled samples held out to validate a retrained candidate, in (0, 0.5]."),
  validationTolerance: n("ratio", 1.5, "Features mode only: a candidate passes when its held-out loss is at most this multiple of its training loss."),
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
