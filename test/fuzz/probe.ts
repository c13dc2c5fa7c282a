import fc from "fast-check";
import { LeewayError, SnapshotError, type Snapshot } from "@leeway/core";

/**
 * One snapshot-bearing component as the fuzz suite drives it: how to build it
 * from drawn options, how to feed it one input (a sample, a vector, or an
 * operator call), and how to put a foreign value where a sample goes.
 */
export interface FuzzSubject<C = unknown, I = unknown> {
  name: string;
  /** Options and a stream of good inputs, drawn together. */
  setup: fc.Arbitrary<FuzzSetup<I>>;
  create(options: unknown): C;
  /** Feeds one input and returns the reading as plain data (copied out of reused buffers). */
  feed(component: C, input: I): unknown;
  snapshot(component: C): Snapshot;
  restore(snapshot: unknown): C;
  /**
   * The input with `value` where a sample goes: the whole sample (`at` = -1)
   * or element `at` of a vector sample; null when the input takes no sample
   * (an operator call), so the probe moves on to the next input.
   */
  place(input: I, value: unknown, at: number): unknown | null;
  /** State fields (by name, at any depth) a refusal may change: counters of refused updates and their last reason. */
  bookkeeping?: readonly string[];
}

/** Options and good inputs of one fuzz case. */
export interface FuzzSetup<I> {
  options: unknown;
  inputs: I[];
}

/** How one probe ended. */
export type Verdict = "refused" | "accepted" | "wrong" | "crashed";

/** A probe's verdict and, for the bad ones, what happened. */
export interface Outcome {
  verdict: Verdict;
  detail: string;
}

const ok = (verdict: "refused" | "accepted", detail = ""): Outcome => ({ verdict, detail });
const bad = (verdict: "wrong" | "crashed", detail: string): Outcome => ({ verdict, detail });

/** Values that are not numbers; none may be taken as a sample. */
export const NOT_NUMBERS: readonly unknown[] = ["5", "", "NaN", null, undefined, [7], [], {}, { valueOf: () => 3 }, true, false, 5n, () => 1];

/** Finite values at the edges of the double range. */
export const EXTREME_FINITE: readonly number[] = [1e300, -1e300, Number.MAX_VALUE, -Number.MAX_VALUE, 1e200, -1e200, 1e154, 1e-300, Number.MIN_VALUE, -Number.MIN_VALUE, -0, 2 ** 53 + 2];

/** Every number in a reading, with its path, that is NaN or ±Infinity. */
export function nonFinitePaths(value: unknown, path = "reading", out: string[] = []): string[] {
  if (typeof value === "number") {
    if (!Number.isFinite(value)) out.push(`${path} = ${value}`);
  } else if (ArrayBuffer.isView(value) && !(value instanceof DataView)) {
    const xs = value as unknown as ArrayLike<number>;
    for (let i = 0; i < xs.length; i++) if (!Number.isFinite(xs[i])) out.push(`${path}[${i}] = ${xs[i]}`);
  } else if (Array.isArray(value)) {
    value.forEach((v, i) => nonFinitePaths(v, `${path}[${i}]`, out));
  } else if (typeof value === "object" && value !== null) {
    for (const [k, v] of Object.entries(value)) nonFinitePaths(v, `${path}.${k}`, out);
  }
  return out;
}

/** A string that tells two readings apart bit for bit (-0, NaN, ±Infinity and typed arrays included). */
export function exact(value: unknown): string {
  return JSON.stringify(value, (_key, v: unknown) => {
    if (typeof v === "number") return Object.is(v, -0) ? "-0" : Number.isFinite(v) ? v : String(v);
    if (typeof v === "bigint") return `${v}n`;
    if (ArrayBuffer.isView(v) && !(v instanceof DataView)) return Array.from(v as unknown as ArrayLike<number>);
    return v;
  });
}

/** A JSON round trip, as a snapshot travels between processes. */
export function throughJson<T>(value: T): T {
  return JSON.parse(JSON.stringify(value)) as T;
}

function describeError(error: unknown): string {
  if (error instanceof LeewayError) return `${error.code}: ${error.message}`;
  if (error instanceof Error) return `${error.name}: ${error.message}`;
  return String(error);
}

/** The snapshot as a string, without the fields a refusal may change. */
function stateKey<C, I>(s: FuzzSubject<C, I>, c: C): string {
  const skip = new Set(s.bookkeeping ?? []);
  return exact(JSON.parse(JSON.stringify(s.snapshot(c), (key, v: unknown) => (skip.has(key) ? undefined : v))));
}

function build<C, I>(s: FuzzSubject<C, I>, setup: FuzzSetup<I>, cut: number): C {
  const c = s.create(setup.options);
  for (let i = 0; i < cut; i++) s.feed(c, setup.inputs[i] as I);
  return c;
}

/**
 * Feeds `inputs` to the component (and, when given, to a twin that must answer
 * identically); every reading must be finite and the final snapshot restorable.
 * Returns null when all is well, else what went wrong.
 */
function continueChecked<C, I>(s: FuzzSubject<C, I>, c: C, inputs: readonly I[], twin?: C): string | null {
  for (let i = 0; i < inputs.length; i++) {
    const input = inputs[i] as I;
    let reading: unknown;
    try {
      reading = s.feed(c, input);
    } catch (error) {
      return `input ${i} after it threw ${describeError(error)}`;
    }
    const nonFinite = nonFinitePaths(reading);
    if (nonFinite.length > 0) return `input ${i} after it gave a non-finite reading: ${nonFinite.slice(0, 3).join(", ")}`;
    if (twin !== undefined) {
      let other: unknown;
      try {
        other = s.feed(twin, input);
      } catch (error) {
        return `input ${i} after it: the restored copy threw ${describeError(error)}`;
      }
      if (exact(other) !== exact(reading)) return `input ${i} after it: the restored copy read ${exact(other).slice(0, 200)}, the original ${exact(reading).slice(0, 200)}`;
    }
  }
  try {
    s.restore(throughJson(s.snapshot(c)));
  } catch (error) {
    return `its own snapshot was refused at the end: ${describeError(error)}`;
  }
  return null;
}

/**
 * Cut, restore, continue: feed `cut` inputs, send the snapshot through JSON,
 * restore it, and feed the rest to both; every reading must agree bit for bit
 * (-0 included) and the final snapshots as JSON.
 */
export function probeCut<C, I>(s: FuzzSubject<C, I>, setup: FuzzSetup<I>, cut: number): Outcome {
  try {
    const original = build(s, setup, cut);
    const restored = s.restore(throughJson(s.snapshot(original)));
    const rest = setup.inputs.slice(cut);
    for (let i = 0; i < rest.length; i++) {
      const a = exact(s.feed(original, rest[i] as I));
      const b = exact(s.feed(restored, rest[i] as I));
      if (a !== b) return bad("wrong", `cut at ${cut}: input ${cut + i} read ${b.slice(0, 200)} after restore, ${a.slice(0, 200)} without`);
    }
    // snapshots are JSON, which writes -0 as 0: compare them as JSON
    const a = JSON.stringify(s.snapshot(original));
    const b = JSON.stringify(s.snapshot(restored));
    if (a !== b) return bad("wrong", `cut at ${cut}: the final snapshots differ`);
    return ok("accepted");
  } catch (error) {
    return bad("crashed", `cut at ${cut}: ${describeError(error)}`);
  }
}

/**
 * Restores a mutated snapshot. Refused with SnapshotError: fine. Accepted:
 * it must be harmless: the rest of the inputs give finite readings without a
 * throw and its own snapshot restores. Any other throw from restore is a crash.
 */
export function probeMutation<C, I>(s: FuzzSubject<C, I>, setup: FuzzSetup<I>, cut: number, mutate: (snapshot: Snapshot) => string): Outcome {
  const snapshot = throughJson(s.snapshot(build(s, setup, cut)));
  const what = mutate(snapshot);
  let restored: C;
  try {
    restored = s.restore(snapshot);
  } catch (error) {
    if (error instanceof SnapshotError) return ok("refused", what);
    return bad("crashed", `${what}: restore threw ${describeError(error)}`);
  }
  const problem = continueChecked(s, restored, setup.inputs.slice(cut));
  return problem === null ? ok("accepted", what) : bad("wrong", `${what} was accepted, then ${problem}`);
}

/**
 * Puts a foreign value where a sample goes. It must be refused with a
 * LeewayError and leave the state exactly as it was (not coerced, not skipped).
 */
export function probeBadSample<C, I>(s: FuzzSubject<C, I>, setup: FuzzSetup<I>, cut: number, value: unknown, at: number): Outcome {
  const c = build(s, setup, cut);
  const input = firstPlaceable(s, setup.inputs, cut, value, at, c);
  if (input === null) return ok("refused", "no input takes a sample");
  const before = stateKey(s, c);
  const shown = `${describeValue(value)} at ${at < 0 ? "the sample" : `element ${at}`}`;
  try {
    s.feed(c, input as I);
  } catch (error) {
    if (!(error instanceof LeewayError)) return bad("crashed", `${shown}: threw ${describeError(error)}`);
    if (stateKey(s, c) !== before) return bad("crashed", `${shown}: refused (${error.code}) but the state changed`);
    return ok("refused", `${shown}: ${error.code}`);
  }
  return bad("wrong", `${shown} was taken as a sample`);
}

/**
 * Puts a finite extreme value where a sample goes. Refused: the state must be
 * unchanged. Accepted: the reading must be finite, the snapshot must restore
 * and continue bit for bit, and the rest of the inputs must give finite readings.
 */
export function probeExtreme<C, I>(s: FuzzSubject<C, I>, setup: FuzzSetup<I>, cut: number, value: number, at: number): Outcome {
  const c = build(s, setup, cut);
  const input = firstPlaceable(s, setup.inputs, cut, value, at, c);
  if (input === null) return ok("refused", "no input takes a sample");
  const before = stateKey(s, c);
  const shown = `${value} at ${at < 0 ? "the sample" : `element ${at}`}`;
  let reading: unknown;
  try {
    reading = s.feed(c, input as I);
  } catch (error) {
    if (!(error instanceof LeewayError)) return bad("crashed", `${shown}: threw ${describeError(error)}`);
    if (stateKey(s, c) !== before) return bad("crashed", `${shown}: refused (${error.code}) but the state changed`);
    return ok("refused", `${shown}: ${error.code}`);
  }
  const nonFinite = nonFinitePaths(reading);
  if (nonFinite.length > 0) return bad("wrong", `${shown} was accepted with a non-finite reading: ${nonFinite.slice(0, 3).join(", ")}`);
  let twin: C;
  try {
    twin = s.restore(throughJson(s.snapshot(c)));
  } catch (error) {
    return bad("wrong", `${shown} was accepted, then its snapshot was refused: ${describeError(error)}`);
  }
  const problem = continueChecked(s, c, setup.inputs.slice(cut + 1), twin);
  return problem === null ? ok("accepted", shown) : bad("wrong", `${shown} was accepted, then ${problem}`);
}

/** Feeds inputs from `cut` on until one takes a sample; returns that input with `value` placed, or null. */
function firstPlaceable<C, I>(s: FuzzSubject<C, I>, inputs: readonly I[], cut: number, value: unknown, at: number, c: C): unknown | null {
  for (let i = cut; i < inputs.length; i++) {
    const placed = s.place(inputs[i] as I, value, at);
    if (placed !== null) return placed;
    s.feed(c, inputs[i] as I);
  }
  return null;
}

function describeValue(value: unknown): string {
  if (typeof value === "string") return JSON.stringify(value);
  if (typeof value === "bigint") return `${value}n`;
  if (typeof value === "function") return "a function";
  if (Array.isArray(value)) return `[${value.join(",")}]`;
  if (typeof value === "object" && value !== null) return "an object";
  return String(value);
}

/** Tally of verdicts per probe class. */
export type Census = Record<Verdict, number>;

/** An empty tally. */
export function emptyCensus(): Census {
  return { refused: 0, accepted: 0, wrong: 0, crashed: 0 };
}
