import { OptionError } from "./errors.js";
import { parseDuration } from "./duration.js";

/** One row of an option table: what the option is, its default, its bounds, its unit and a one-line doc. */
export type OptionRow =
  | { kind: "integer"; default: number; min: number; max: number; unit: string; doc: string }
  | { kind: "number"; default: number; min?: number; max?: number; minExclusive?: boolean; maxExclusive?: boolean; unit: string; doc: string }
  | { kind: "choice"; default: string; choices: readonly string[]; doc: string }
  | { kind: "boolean"; default: boolean; doc: string }
  | { kind: "seed"; default: number | string; doc: string }
  /**
   * A span of the stream: a count of samples, or a duration ("90s", "15m",
   * "4h", "2d") turned into samples by the sample period. The default is a
   * duration with a floor in samples (`atLeast`), so one set of defaults
   * serves any sample rate; `min` and `max` bound the resolved count.
   */
  | { kind: "span"; default: string | number; atLeast: number; min: number; max: number; doc: string };

/** An option table: every option of a component, declared once. */
export type OptionRows = Readonly<Record<string, OptionRow>>;

/** The resolved value type of one row. */
export type ResolvedValue<R extends OptionRow> = R extends { kind: "choice"; choices: readonly (infer C)[] }
  ? C
  : R extends { kind: "boolean" }
    ? boolean
    : R extends { kind: "seed" }
      ? number | string
      : number;

/** The resolved settings of a table: every option present, validated, spans in samples. */
export type ResolvedOptions<T extends OptionRows> = { -readonly [K in keyof T]: ResolvedValue<T[K]> };

/** A row as the docs and a config schema see it: plain data. */
export interface OptionDescription {
  name: string;
  kind: OptionRow["kind"];
  default: number | string | boolean;
  min: number | null;
  max: number | null;
  choices: readonly string[] | null;
  unit: string;
  /** What is allowed, in words ("a number in (0.5, 1)", "a span of 20 to 100000 samples; default at least 30"). */
  allowed: string;
  doc: string;
}

/** What a span is resolved against. */
export interface SpanContext {
  /** Seconds per sample (default 1). */
  samplePeriod?: number;
}

/**
 * One declaration per component of its options (name, default, bounds, unit,
 * doc) from which defaults, validation, snapshot settings, config schemas and
 * docs are all derived, so that no default or bound is written twice.
 * @example
 * const table = optionTable("Thing", {
 *   window: { kind: "span", default: "10m", atLeast: 20, min: 2, max: 1e6, doc: "samples in the window" },
 *   k: { kind: "number", default: 0.5, min: 0, unit: "σ", doc: "reference value" },
 * });
 * table.resolve({ window: "2m" }, { samplePeriod: 10 }); // { window: 12, k: 0.5 }
 * table.resolve({}, { samplePeriod: 600 }).window; // 20 (10 min is one sample; the floor is 20)
 */
export class OptionTable<T extends OptionRows> {
  readonly component: string;
  readonly rows: T;
  readonly names: readonly (keyof T & string)[];

  constructor(component: string, rows: T) {
    this.component = component;
    this.rows = rows;
    this.names = Object.keys(rows) as (keyof T & string)[];
  }

  /** Validates `options` (missing keys take their defaults; unknown keys are not checked here) and resolves spans to samples. */
  resolve(options: Readonly<Record<string, unknown>>, context: SpanContext = {}): ResolvedOptions<T> {
    const period = context.samplePeriod ?? 1;
    const out: Record<string, unknown> = {};
    for (const name of this.names) {
      const row = this.rows[name] as OptionRow;
      const given = options[name];
      out[name] = given === undefined ? this.#defaultOf(row, period) : this.#check(name, row, given, period);
    }
    return out as ResolvedOptions<T>;
  }

  /** The default settings at a sample period. */
  defaults(context: SpanContext = {}): ResolvedOptions<T> {
    return this.resolve({}, context);
  }

  /** The table as plain rows, in declaration order (for docs and config schemas). */
  describe(): OptionDescription[] {
    return this.names.map((name) => {
      const row = this.rows[name] as OptionRow;
      const bounded = row.kind === "integer" || row.kind === "number" || row.kind === "span";
      return {
        name,
        kind: row.kind,
        default: row.default,
        min: bounded ? (row.min ?? null) : null,
        max: bounded ? (row.max ?? null) : null,
        choices: row.kind === "choice" ? row.choices : null,
        unit: row.kind === "span" ? "samples or a duration" : "unit" in row ? row.unit : "",
        allowed: allowedText(row),
        doc: row.doc,
      };
    });
  }

  #defaultOf(row: OptionRow, period: number): unknown {
    if (row.kind !== "span") return row.default;
    const samples = typeof row.default === "number" ? row.default : Math.round(parseDuration(row.default) / period);
    return Math.min(row.max, Math.max(row.atLeast, samples));
  }

  #check(name: string, row: OptionRow, value: unknown, period: number): unknown {
    const c = this.component;
    switch (row.kind) {
      case "integer":
        if (typeof value !== "number" || !Number.isInteger(value) || value < row.min || value > row.max) throw new OptionError(c, name, value, `an integer in [${row.min}, ${row.max}]`);
        return value;
      case "number": {
        const { min = -Infinity, max = Infinity, minExclusive = false, maxExclusive = false } = row;
        const ok = typeof value === "number" && Number.isFinite(value) && (minExclusive ? value > min : value >= min) && (maxExclusive ? value < max : value <= max);
        if (!ok) throw new OptionError(c, name, value, `a finite number in ${minExclusive ? "(" : "["}${min}, ${max}${maxExclusive ? ")" : "]"}`);
        return value;
      }
      case "choice":
        if (typeof value !== "string" || !row.choices.includes(value)) throw new OptionError(c, name, value, `one of ${row.choices.map((s) => JSON.stringify(s)).join(", ")}`);
        return value;
      case "boolean":
        if (typeof value !== "boolean") throw new OptionError(c, name, value, "true or false");
        return value;
      case "seed":
        if ((typeof value === "number" && Number.isFinite(value)) || (typeof value === "string" && value.length > 0)) return value;
        throw new OptionError(c, name, value, "a finite number or a non-empty string");
      case "span":
        return this.#span(name, row, value, period);
    }
  }

  #span(name: string, row: Extract<OptionRow, { kind: "span" }>, value: unknown, period: number): number {
    const allowed = `an integer count of samples in [${row.min}, ${row.max}] or a duration such as "90s", "15m", "4h", "2d" that is that many samples at the sample period`;
    let samples: number;
    if (typeof value === "number") samples = value;
    else if (typeof value === "string") {
      let seconds: number;
      try {
        seconds = parseDuration(value);
      } catch {
        throw new OptionError(this.component, name, value, allowed);
      }
      samples = Math.round(seconds / period);
      if (samples < row.min || samples > row.max) throw new OptionError(this.component, name, value, `${allowed}; at ${period} s per sample it is ${samples} samples`);
    } else throw new OptionError(this.component, name, value, allowed);
    if (!Number.isInteger(samples) || samples < row.min || samples > row.max) throw new OptionError(this.component, name, value, allowed);
    return samples;
  }
}

function allowedText(row: OptionRow): string {
  switch (row.kind) {
    case "integer":
      return `an integer in [${row.min}, ${row.max}]`;
    case "number": {
      const { min = -Infinity, max = Infinity, minExclusive = false, maxExclusive = false } = row;
      if (max === Infinity) return min === -Infinity ? "a finite number" : `a number ${minExclusive ? ">" : "≥"} ${min}`;
      return `a number in ${minExclusive ? "(" : "["}${min}, ${max}${maxExclusive ? ")" : "]"}`;
    }
    case "choice":
      return `one of ${row.choices.map((c) => JSON.stringify(c)).join(", ")}`;
    case "boolean":
      return "true or false";
    case "seed":
      return "a finite number or a non-empty string";
    case "span":
      return `${row.min} to ${row.max} samples, or a duration; the default is at least ${row.atLeast} samples`;
  }
}

/** Declares a component's option table (see {@link OptionTable}). */
export function optionTable<const T extends OptionRows>(component: string, rows: T): OptionTable<T> {
  return new OptionTable(component, rows);
}
