import { InputError } from "./exit-codes.js";
import { suggestion } from "./nearest.js";

/** A key of the pipeline config file: its type, unit, default and meaning. */
export type ConfigField =
  | { kind: "number"; unit: string; default: number | null; min?: number; max?: number; integer?: boolean; doc: string }
  | { kind: "string"; default: string | null; choices?: readonly string[]; doc: string }
  | { kind: "strings"; default: readonly string[] | null; doc: string }
  | { kind: "boolean"; default: boolean; doc: string }
  | { kind: "seed"; default: number | string; doc: string }
  /** A span of the stream: an integer count of samples or a duration string such as "15m" (checked by the component that takes it). */
  | { kind: "span"; default: number | string; min: number; max: number; doc: string }
  | { kind: "section"; fields: Readonly<Record<string, ConfigField>>; doc: string };

/** A validated config value: numbers, strings, booleans, string lists and nested sections, defaults filled in. */
export type ConfigValue = number | string | boolean | null | readonly string[] | ConfigObject;
/** A validated config section. */
export interface ConfigObject {
  readonly [key: string]: ConfigValue;
}

/**
 * Validates parsed JSON against a schema: every key must be known (an unknown
 * key is named, with the nearest known key of its section suggested), every
 * value of the right type and range; missing keys take their defaults.
 * `locate(path)` turns a key path into "line:column" of the file for messages.
 * @example
 * validateConfig({ engine: { hiden: 8 } }, CONFIG_FIELDS, "pipeline.json", () => "3:5");
 * // throws InputError: pipeline.json:3:5: unknown key "engine.hiden"; did you mean "engine.hidden"? (known keys of "engine": ...)
 */
export function validateConfig(
  value: unknown,
  fields: Readonly<Record<string, ConfigField>>,
  file: string,
  locate: (path: readonly string[]) => string,
  path: readonly string[] = [],
): ConfigObject {
  const where = (p: readonly string[]): string => `${file}:${locate(p)}`;
  if (typeof value !== "object" || value === null || Array.isArray(value)) {
    throw new InputError(`${where(path)}: ${path.length === 0 ? "the config" : `"${path.join(".")}"`} must be a JSON object, got ${jsonType(value)}`);
  }
  const input = value as Record<string, unknown>;
  const known = Object.keys(fields);
  for (const key of Object.keys(input)) {
    if (!known.includes(key)) {
      const full = [...path, key].join(".");
      throw new InputError(`${where([...path, key])}: unknown key "${full}"${suggestion(key, known, (s) => `"${[...path, s].join(".")}"`)} (known keys${path.length === 0 ? "" : ` of "${path.join(".")}"`}: ${known.join(", ")})`);
    }
  }
  const out: Record<string, ConfigValue> = {};
  for (const [key, field] of Object.entries(fields)) {
    const p = [...path, key];
    const v = input[key];
    if (field.kind === "section") {
      out[key] = validateConfig(v === undefined ? {} : v, field.fields, file, locate, p);
      continue;
    }
    out[key] = v === undefined ? field.default : checkValue(v, field, p.join("."), where(p));
  }
  return out;
}

function checkValue(v: unknown, field: Exclude<ConfigField, { kind: "section" }>, key: string, where: string): ConfigValue {
  const fail = (expected: string): never => {
    throw new InputError(`${where}: "${key}" must be ${expected}, got ${JSON.stringify(v)}`);
  };
  switch (field.kind) {
    case "number": {
      if (v === null && field.default === null) return null;
      if (typeof v !== "number") return fail(numberText(field));
      if (field.integer === true && !Number.isInteger(v)) return fail(numberText(field));
      if ((field.min !== undefined && v < field.min) || (field.max !== undefined && v > field.max)) return fail(numberText(field));
      return v;
    }
    case "string": {
      if (v === null && field.default === null) return null;
      if (typeof v !== "string") return fail(field.choices === undefined ? "a string" : `one of ${field.choices.map((c) => JSON.stringify(c)).join(", ")}`);
      if (field.choices !== undefined && !field.choices.includes(v)) {
        throw new InputError(`${where}: "${key}" must be one of ${field.choices.map((c) => JSON.stringify(c)).join(", ")}, got ${JSON.stringify(v)}${suggestion(v, field.choices, (s) => JSON.stringify(s))}`);
      }
      return v;
    }
    case "strings": {
      if (v === null && field.default === null) return null;
      if (!Array.isArray(v) || v.length === 0 || !v.every((s) => typeof s === "string" && s.length > 0)) return fail("a non-empty array of non-empty strings");
      return v as string[];
    }
    case "boolean":
      if (typeof v !== "boolean") return fail("true or false");
      return v;
    case "seed":
      if ((typeof v === "number" && Number.isFinite(v)) || (typeof v === "string" && v.length > 0)) return v;
      return fail("a finite number or a non-empty string");
    case "span":
      // The range is checked by the component that takes the span, so its message names the option.
      if (typeof v === "number" || (typeof v === "string" && v.length > 0)) return v;
      return fail(`an integer count of samples in [${field.min}, ${field.max}] or a duration such as "15m"`);
  }
}

/** "an integer in [1, 4096]"-style text for a number field. */
export function numberText(field: { min?: number; max?: number; integer?: boolean }): string {
  const noun = field.integer === true ? "an integer" : "a number";
  if (field.min !== undefined && field.max !== undefined) return `${noun} in [${field.min}, ${field.max}]`;
  if (field.min !== undefined) return `${noun} >= ${field.min}`;
  if (field.max !== undefined) return `${noun} <= ${field.max}`;
  return noun;
}

function jsonType(v: unknown): string {
  if (v === null) return "null";
  if (Array.isArray(v)) return "an array";
  return typeof v === "string" ? `a string` : typeof v;
}

/**
 * The line and column ("12:5") in JSON text where the key at `path` is
 * written, found by walking the text's objects (the text is known to parse).
 * Falls back to the enclosing object's position, or "1:1".
 */
export function locateJsonKey(text: string, path: readonly string[]): string {
  let open = text.indexOf("{");
  let found = Math.max(0, open);
  for (const key of path) {
    const at = findKeyInObject(text, open, key);
    if (at < 0) break;
    found = at;
    // The value after the colon: the next object to search, if it is one.
    let v = text.indexOf(":", at + JSON.stringify(key).length) + 1;
    while (v < text.length && /\s/.test(text[v] as string)) v++;
    open = text[v] === "{" ? v : -1;
  }
  return lineColumn(text, found);
}

/** The offset of `"key"` as a key of the object opening at `open`, at that object's own depth. */
function findKeyInObject(text: string, open: number, key: string): number {
  if (open < 0) return -1;
  const quoted = JSON.stringify(key);
  let depth = 0;
  for (let i = open; i < text.length; i++) {
    const c = text[i];
    if (c === '"') {
      const end = skipString(text, i);
      if (depth === 1 && text.slice(i, end + 1) === quoted && /^\s*:/.test(text.slice(end + 1, end + 40))) return i;
      i = end;
    } else if (c === "{" || c === "[") depth++;
    else if (c === "}" || c === "]") {
      depth--;
      if (depth === 0) return -1;
    }
  }
  return -1;
}

function skipString(text: string, start: number): number {
  for (let i = start + 1; i < text.length; i++) {
    if (text[i] === "\\") i++;
    else if (text[i] === '"') return i;
  }
  return text.length;
}

/** "line:column" (both 1-based) of a character offset. */
export function lineColumn(text: string, offset: number): string {
  let line = 1;
  let last = -1;
  for (let i = 0; i < offset && i < text.length; i++) {
    if (text.charCodeAt(i) === 10) {
      line++;
      last = i;
    }
  }
  return `${line}:${offset - last}`;
}

/** Parses config JSON text, turning a syntax error into an {@link InputError} with line and column. */
export function parseConfigText(text: string, file: string): unknown {
  try {
    return JSON.parse(text);
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    const position = /position (\d+)/.exec(message);
    const at = position === null ? "1:1" : lineColumn(text, Number(position[1]));
    throw new InputError(`${file}:${at}: the config is not valid JSON (${message}); expected a JSON object`);
  }
}

/** Every key path of a schema with its field, depth first, for documentation and tests. */
export function schemaKeys(fields: Readonly<Record<string, ConfigField>>, prefix = ""): { key: string; field: ConfigField }[] {
  const out: { key: string; field: ConfigField }[] = [];
  for (const [name, field] of Object.entries(fields)) {
    const key = prefix === "" ? name : `${prefix}.${name}`;
    out.push({ key, field });
    if (field.kind === "section") out.push(...schemaKeys(field.fields, key));
  }
  return out;
}
