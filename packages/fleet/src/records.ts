/**
 * The record format of a partition's input stream. Each entry's fields:
 *
 * | field | meaning |
 * |---|---|
 * | `s` | stream id (sensor or machine), required |
 * | `g` | site or group id (default "") |
 * | `v` | a sample: comma-separated numbers — score-only mode `live[,commissioning[,newest]]`, feature mode one value per input |
 * | `t` | optional time of the sample (any finite number, carried into the output) |
 * | `op` | instead of `v`, an operator event: one of {@link OPERATOR_EVENTS} |
 * | `n` | the length of `start-commissioning`, in samples |
 */

/** Operator events a record may carry, applied to its stream's engine in log order. */
export const OPERATOR_EVENTS = ["acknowledge", "confirm-retrain", "reject-retrain", "model-replaced", "start-commissioning", "site-shift"] as const;
/** One of {@link OPERATOR_EVENTS}. */
export type OperatorEvent = (typeof OPERATOR_EVENTS)[number];

/** A parsed input record. */
export type InputRecord =
  | { kind: "sample"; stream: string; site: string; values: Float64Array; time: string | null }
  | { kind: "operator"; stream: string; site: string; event: OperatorEvent; length: number | null }
  | { kind: "malformed"; stream: string; site: string; reason: string };

const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const NON_FINITE = /^[+-]?(?:nan|inf|infinity)$/i;
const MAX_STREAM_ID = 256;
const MAX_VALUES = 1 << 16;

/** The fields of an entry (a flat `[field, value, ...]` list) as a map; a repeated field is kept first. */
function fieldMap(fields: readonly string[]): Map<string, string> {
  const map = new Map<string, string>();
  for (let i = 0; i + 1 < fields.length; i += 2) if (!map.has(fields[i] as string)) map.set(fields[i] as string, fields[i + 1] as string);
  return map;
}

/**
 * Parses one entry of an input stream. Never throws: anything unusable comes
 * back as `{ kind: "malformed", reason }` for the dead-letter stream.
 * `allowNonFinite` lets NaN and ±Infinity through (engines with nonFinite "skip").
 * @example
 * parseRecord(["s", "ps2-de", "g", "harbour-lane", "v", "0.8,0.7"], false).kind; // "sample"
 * parseRecord(["s", "ps2-de", "v", "0.8,x"], false); // { kind: "malformed", ..., reason: "v[1] is not a number: \"x\"" }
 */
export function parseRecord(fields: readonly string[], allowNonFinite: boolean): InputRecord {
  const f = fieldMap(fields);
  const stream = f.get("s") ?? "";
  const site = f.get("g") ?? "";
  const bad = (reason: string): InputRecord => ({ kind: "malformed", stream, site, reason });
  if (stream.length === 0) return bad("field s (stream id) is missing or empty");
  if (stream.length > MAX_STREAM_ID) return bad(`stream id is ${stream.length} characters long; at most ${MAX_STREAM_ID} are allowed`);
  const op = f.get("op");
  if (op !== undefined) {
    if (!(OPERATOR_EVENTS as readonly string[]).includes(op)) return bad(`op ${JSON.stringify(op)} is not one of ${OPERATOR_EVENTS.join(", ")}`);
    if (op !== "start-commissioning") return { kind: "operator", stream, site, event: op as OperatorEvent, length: null };
    const n = Number(f.get("n"));
    if (!Number.isInteger(n) || n < 10) return bad(`start-commissioning needs n, an integer >= 10, got ${JSON.stringify(f.get("n") ?? null)}`);
    return { kind: "operator", stream, site, event: "start-commissioning", length: n };
  }
  const text = f.get("v");
  if (text === undefined) return bad("neither v (a sample) nor op (an operator event) is given");
  const tokens = text.split(",");
  if (tokens.length > MAX_VALUES) return bad(`v has ${tokens.length} values; at most ${MAX_VALUES} are allowed`);
  const values = new Float64Array(tokens.length);
  for (let i = 0; i < tokens.length; i++) {
    const token = (tokens[i] as string).trim();
    if (NUMBER.test(token)) values[i] = Number(token);
    else if (NON_FINITE.test(token)) {
      if (!allowNonFinite) return bad(`v[${i}] is not finite: ${JSON.stringify(token)}`);
      values[i] = /nan/i.test(token) ? NaN : token.startsWith("-") ? -Infinity : Infinity;
    } else return bad(`v[${i}] is not a number: ${JSON.stringify(token)}`);
    if (!Number.isFinite(values[i] as number) && !allowNonFinite) return bad(`v[${i}] is not finite: ${JSON.stringify(token)}`);
  }
  const time = f.get("t") ?? null;
  if (time !== null && !(NUMBER.test(time) && Number.isFinite(Number(time)))) return bad(`t is not a finite number: ${JSON.stringify(time)}`);
  return { kind: "sample", stream, site, values, time };
}

/**
 * The fields of a sample record, as {@link parseRecord} reads them. Numbers
 * are written by `String(x)`, which reads back to the same double.
 * @example
 * sampleFields("ps2-de", "harbour-lane", [0.8, 0.7]); // ["s", "ps2-de", "g", "harbour-lane", "v", "0.8,0.7"]
 */
export function sampleFields(stream: string, site: string, values: ArrayLike<number>, time?: number): string[] {
  const parts: string[] = new Array(values.length);
  for (let i = 0; i < values.length; i++) parts[i] = String(values[i]);
  const out = ["s", stream, "g", site, "v", parts.join(",")];
  if (time !== undefined) out.push("t", String(time));
  return out;
}

/**
 * The fields of an operator-event record.
 * @example
 * operatorFields("ps2-de", "harbour-lane", "acknowledge"); // ["s", "ps2-de", "g", "harbour-lane", "op", "acknowledge"]
 */
export function operatorFields(stream: string, site: string, event: OperatorEvent, length?: number): string[] {
  const out = ["s", stream, "g", site, "op", event];
  if (length !== undefined) out.push("n", String(length));
  return out;
}
