import { DimensionError, OptionError, integerInRange, oneOf } from "@leeway/core";

/** What truly happened to the machine during a labelled event. */
export type EventCause = "concept-drift" | "degradation" | "anomaly";

/** The three event causes, in the order tables list them. */
export const EVENT_CAUSES: readonly EventCause[] = ["concept-drift", "degradation", "anomaly"];

/**
 * A labelled span of a stream: what happened and when. Indices are sample
 * positions in the replayed stream (0-based); `end` is exclusive. A simulator's
 * ground-truth event (`TruthEvent` of `@leeway/sim`) is assignable to it.
 * @example
 * const clog: LabelledEvent = { id: "clog", cause: "anomaly", start: 5000, end: 5600 };
 */
export interface LabelledEvent {
  cause: EventCause;
  /** First sample of the event. */
  start: number;
  /** First sample after the event (exclusive), > start. */
  end: number;
  /** An identifier carried into the per-event results. */
  id?: string;
  /** A finer type (for example "mode-change"), carried into the per-event results. */
  type?: string;
}

/**
 * The truth a replay is measured against: the labelled events and, optionally,
 * one anomaly flag per sample (true = the sample is abnormal) for the ROC and
 * PR AUC of the scores.
 */
export interface ReplayLabels {
  events: readonly LabelledEvent[];
  anomaly?: ArrayLike<boolean>;
}

/** A labelled event after validation, with its position in the input list. */
export interface CheckedEvent {
  cause: EventCause;
  start: number;
  end: number;
  id: string | null;
  type: string | null;
  /** Position in the `events` array given. */
  order: number;
}

const LARGEST_INDEX = Number.MAX_SAFE_INTEGER;

/**
 * Validates labelled events and returns them sorted by start (stable, so that
 * events with equal starts keep their input order).
 */
export function checkEvents(component: string, events: unknown): CheckedEvent[] {
  if (!Array.isArray(events)) throw new OptionError(component, "labels.events", events, "an array of labelled events");
  const checked: CheckedEvent[] = events.map((raw: unknown, order) => {
    const where = `labels.events[${order}]`;
    if (typeof raw !== "object" || raw === null) throw new OptionError(component, where, raw, "an object { cause, start, end }");
    const e = raw as Record<string, unknown>;
    const cause = oneOf(component, `${where}.cause`, e.cause, EVENT_CAUSES);
    const start = integerInRange(component, `${where}.start`, e.start, 0, LARGEST_INDEX - 1);
    const end = integerInRange(component, `${where}.end`, e.end, start + 1, LARGEST_INDEX);
    const id = optionalString(component, `${where}.id`, e.id);
    const type = optionalString(component, `${where}.type`, e.type);
    return { cause, start, end, id, type, order };
  });
  return checked.sort((a, b) => a.start - b.start || a.order - b.order);
}

/** Validates per-sample anomaly flags against the stream length. */
export function checkAnomalyFlags(component: string, flags: unknown, length: number): ArrayLike<boolean> {
  const isArrayLike = Array.isArray(flags) || (ArrayBuffer.isView(flags) && !(flags instanceof DataView));
  if (!isArrayLike) throw new OptionError(component, "labels.anomaly", flags, "an array of booleans, one per sample");
  const items = flags as ArrayLike<unknown>;
  if (items.length !== length) throw new DimensionError(component, "labels.anomaly", length, items.length);
  return toFlags(component, "labels.anomaly", items);
}

/**
 * Reads flags given as booleans or as the numbers 0 and 1 (a Uint8Array, for
 * example); anything else is refused.
 */
export function toFlags(component: string, parameter: string, items: ArrayLike<unknown>): ArrayLike<boolean> {
  if (Array.isArray(items) && items.every((v) => typeof v === "boolean")) return items as boolean[];
  const out = new Array<boolean>(items.length);
  for (let i = 0; i < items.length; i++) {
    const v = items[i];
    if (v === true || v === 1) out[i] = true;
    else if (v === false || v === 0) out[i] = false;
    else throw new OptionError(component, `${parameter}[${i}]`, v, "true, false, 1 or 0");
  }
  return out;
}

/**
 * Per-sample flags that are true inside the events of the given causes: a
 * convenient anomaly labelling when only the events are known.
 * @example
 * anomalyMask([{ cause: "anomaly", start: 2, end: 4 }], 6);
 * // [false, false, true, true, false, false]
 */
export function anomalyMask(events: readonly LabelledEvent[], length: number, causes: readonly EventCause[] = ["anomaly"]): boolean[] {
  const n = integerInRange("anomalyMask", "length", length, 0, 2 ** 32);
  const mask = new Array<boolean>(n).fill(false);
  for (const e of checkEvents("anomalyMask", events)) {
    if (!causes.includes(e.cause)) continue;
    for (let i = e.start; i < Math.min(e.end, n); i++) mask[i] = true;
  }
  return mask;
}

function optionalString(component: string, option: string, value: unknown): string | null {
  if (value === undefined) return null;
  if (typeof value !== "string") throw new OptionError(component, option, value, "a string, when given");
  return value;
}
