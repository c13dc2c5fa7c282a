import { LeewayError, OptionError, type OptionDescription } from "@leeway/core";
import { DecisionEngine, describeEngineOptions, type DecisionEngineOptions } from "@leeway/policy";
import { locateJsonKey, parseConfigText, validateConfig, type ConfigField, type ConfigObject } from "./config-schema.js";
import { InputError } from "./exit-codes.js";
import type { StreamMode } from "./input/samples.js";

const n = (unit: string, def: number | null, doc: string, extra: { min?: number; max?: number; integer?: boolean } = {}): ConfigField => ({ kind: "number", unit, default: def, doc, ...extra });

/** The config field of one engine option, from the engine's option tables. */
function engineField(o: OptionDescription): ConfigField {
  switch (o.kind) {
    case "span":
      return { kind: "span", default: o.default as number | string, min: o.min ?? 0, max: o.max ?? 2 ** 31 - 1, doc: o.doc };
    case "choice":
      return { kind: "string", default: o.default as string, choices: o.choices ?? [], doc: o.doc };
    case "seed":
      return { kind: "seed", default: o.default as number | string, doc: o.doc };
    case "boolean":
      return { kind: "boolean", default: o.default as boolean, doc: o.doc };
    default:
      // samplePeriod also takes a duration string; the engine checks it.
      if (o.name === "samplePeriod") return { kind: "span", default: o.default as number, min: 0, max: 2 ** 31 - 1, doc: o.doc };
      return { kind: "number", unit: o.unit, default: o.default as number, doc: o.doc, ...(o.kind === "integer" ? { integer: true } : {}), ...(o.min !== null ? { min: o.min } : {}), ...(o.max !== null ? { max: o.max } : {}) };
  }
}

/**
 * The keys of the `engine` section: the options of the decision engine
 * (`@leeway/policy`), derived from its option tables and passed on unchanged;
 * the engine checks their ranges. Defaults are the engine's own: spans as
 * durations at the sample period (one second unless `samplePeriod` says otherwise).
 */
export const ENGINE_FIELDS: Readonly<Record<string, ConfigField>> = Object.fromEntries(describeEngineOptions().map((o) => [o.name, engineField(o)]));

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
