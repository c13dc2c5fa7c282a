import type { LabelledEvent } from "@leeway/eval";
import { InputError } from "./exit-codes.js";
import { lineColumn, locateJsonKey, parseConfigText } from "./config-schema.js";
import { suggestion } from "./nearest.js";
import type { ReportEvent } from "./report/plots.js";

/** A labels file as read: the events and, optionally, one anomaly flag per sample. */
export interface LabelsFile {
  events: (LabelledEvent & ReportEvent)[];
  anomaly: boolean[] | null;
}

const EVENT_KEYS = ["cause", "start", "end", "id", "type", "label"];
const CAUSES = ["concept-drift", "degradation", "anomaly"] as const;

/**
 * Reads a labels file: JSON, either an array of events or an object
 * `{ "events": [...], "anomaly": [0, 1, ...] }`. An event is
 * `{ cause, start, end, id?, type?, label? }` with sample indices (0-based,
 * `end` exclusive) and cause `concept-drift`, `degradation` or `anomaly`.
 * `anomaly` holds one flag (true/false or 1/0) per sample, for ROC and PR AUC.
 */
export function parseLabels(text: string, file: string): LabelsFile {
  const raw = parseConfigText(text, file);
  const root = Array.isArray(raw) ? { events: raw } : raw;
  if (typeof root !== "object" || root === null) throw new InputError(`${file}:1:1: expected an array of events or an object {"events": [...]}`);
  const r = root as Record<string, unknown>;
  for (const key of Object.keys(r)) {
    if (key !== "events" && key !== "anomaly") throw new InputError(`${file}:${locateJsonKey(text, [key])}: unknown key "${key}"${suggestion(key, ["events", "anomaly"], (s) => `"${s}"`)} (known keys: events, anomaly)`);
  }
  if (!Array.isArray(r.events)) throw new InputError(`${file}:1:1: "events" must be an array of events`);
  const starts = eventOffsets(text);
  const events = r.events.map((e: unknown, i: number) => {
    const at = `${file}:${starts[i] === undefined ? "1:1" : lineColumn(text, starts[i] as number)}`;
    if (typeof e !== "object" || e === null || Array.isArray(e)) throw new InputError(`${at}: event ${i} must be an object {cause, start, end}`);
    const ev = e as Record<string, unknown>;
    for (const key of Object.keys(ev)) {
      if (!EVENT_KEYS.includes(key)) throw new InputError(`${at}: event ${i}: unknown key "${key}"${suggestion(key, EVENT_KEYS, (s) => `"${s}"`)} (known keys: ${EVENT_KEYS.join(", ")})`);
    }
    if (!CAUSES.includes(ev.cause as (typeof CAUSES)[number])) throw new InputError(`${at}: event ${i}: "cause" must be one of ${CAUSES.join(", ")}, got ${JSON.stringify(ev.cause) ?? "nothing"}${typeof ev.cause === "string" ? suggestion(ev.cause, CAUSES, (s) => `"${s}"`) : ""}`);
    if (typeof ev.start !== "number" || !Number.isInteger(ev.start) || ev.start < 0) throw new InputError(`${at}: event ${i}: "start" must be an integer sample index >= 0, got ${JSON.stringify(ev.start) ?? "nothing"}`);
    if (typeof ev.end !== "number" || !Number.isInteger(ev.end) || ev.end <= ev.start) throw new InputError(`${at}: event ${i}: "end" must be an integer sample index > start (${ev.start}), got ${JSON.stringify(ev.end) ?? "nothing"}`);
    const out: LabelledEvent & ReportEvent = { cause: ev.cause as (typeof CAUSES)[number], start: ev.start, end: ev.end };
    for (const key of ["id", "type", "label"] as const) {
      const v = ev[key];
      if (v === undefined) continue;
      if (typeof v !== "string") throw new InputError(`${at}: event ${i}: "${key}" must be a string, got ${JSON.stringify(v)}`);
      out[key] = v;
    }
    return out;
  });
  let anomaly: boolean[] | null = null;
  if (r.anomaly !== undefined) {
    if (!Array.isArray(r.anomaly)) throw new InputError(`${file}:${locateJsonKey(text, ["anomaly"])}: "anomaly" must be an array of flags (true/false or 1/0), one per sample`);
    anomaly = r.anomaly.map((v: unknown, i: number) => {
      if (v === true || v === 1) return true;
      if (v === false || v === 0) return false;
      throw new InputError(`${file}:${locateJsonKey(text, ["anomaly"])}: "anomaly"[${i}] must be true, false, 1 or 0, got ${JSON.stringify(v)}`);
    });
  }
  return { events, anomaly };
}

/** Offsets of the objects of the first array in the text (the events), for positions in messages. */
function eventOffsets(text: string): number[] {
  const open = text.trimStart().startsWith("[") ? text.indexOf("[") : text.indexOf("[", text.indexOf('"events"'));
  const out: number[] = [];
  if (open < 0) return out;
  let depth = 0;
  let inString = false;
  for (let i = open; i < text.length; i++) {
    const c = text[i];
    if (inString) {
      if (c === "\\") i++;
      else if (c === '"') inString = false;
      continue;
    }
    if (c === '"') inString = true;
    else if (c === "[" || c === "{") {
      if (depth === 1 && c === "{") out.push(i);
      depth++;
    } else if (c === "]" || c === "}") {
      depth--;
      if (depth === 0) break;
    }
  }
  return out;
}
