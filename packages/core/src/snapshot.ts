import { SnapshotError } from "./errors.js";

/**
 * The envelope every snapshot travels in: JSON-safe plain data, a `kind` that
 * names the component (`"leeway.<package>.<component>"`), and a `version` of
 * the state layout.
 */
export interface Snapshot<S = unknown> {
  kind: string;
  version: number;
  state: S;
}

/**
 * The largest array a snapshot may hold (2^24 elements, 128 MiB as float64).
 * Sizes above it are refused before anything is allocated.
 */
export const MAX_SNAPSHOT_ELEMENTS = 2 ** 24;

/** Wraps plain state in the snapshot envelope. */
export function envelope<S>(kind: string, version: number, state: S): Snapshot<S> {
  return { kind, version, state };
}

/**
 * Checks the envelope (an object, the expected kind, a supported version, a
 * state object) and returns a reader over its state.
 * @example
 * const reader = openSnapshot(s, "leeway.stats.moments", 1);
 * const count = reader.integer("count", 0, Number.MAX_SAFE_INTEGER);
 */
export function openSnapshot(snapshot: unknown, kind: string, version: number): SnapshotReader {
  if (!isPlainObject(snapshot)) throw new SnapshotError(kind, "snapshot", `must be an object, got ${typeName(snapshot)}`);
  if (snapshot.kind !== kind) throw new SnapshotError(kind, "kind", `must be ${JSON.stringify(kind)}, got ${JSON.stringify(snapshot.kind) ?? "undefined"}`);
  const v = snapshot.version;
  if (typeof v !== "number" || !Number.isInteger(v) || v < 1) throw new SnapshotError(kind, "version", `must be a positive integer, got ${String(v)}`);
  if (v > version) throw new SnapshotError(kind, "version", `is ${v}, newer than the supported version ${version}`);
  if (v !== version) throw new SnapshotError(kind, "version", `is ${v}; only version ${version} can be restored`);
  if (!isPlainObject(snapshot.state)) throw new SnapshotError(kind, "state", `must be an object, got ${typeName(snapshot.state)}`);
  return new SnapshotReader(kind, "state", snapshot.state);
}

/**
 * Typed, validating access to the fields of a snapshot's state. Every getter
 * throws a {@link SnapshotError} naming the field's path when the value is
 * missing or malformed, so a restore either gets valid data or stops.
 */
export class SnapshotReader {
  readonly kind: string;
  readonly path: string;
  readonly #data: Record<string, unknown>;

  constructor(kind: string, path: string, data: Record<string, unknown>) {
    this.kind = kind;
    this.path = path;
    this.#data = data;
  }

  /** Throws a SnapshotError for a field of this object. */
  fail(name: string, problem: string): never {
    throw new SnapshotError(this.kind, `${this.path}.${name}`, problem);
  }

  /** True when the field is present (and not undefined). */
  has(name: string): boolean {
    return this.#data[name] !== undefined;
  }

  /** The raw value of a field that must be present (for a nested component's own `restore`). */
  raw(name: string): unknown {
    const value = this.#data[name];
    if (value === undefined) this.fail(name, "is missing");
    return value;
  }

  /** A finite number. */
  number(name: string): number {
    const value = this.#data[name];
    if (value === undefined) this.fail(name, "is missing");
    if (typeof value !== "number" || !Number.isFinite(value)) this.fail(name, `must be a finite number, got ${show(value)}`);
    return value;
  }

  /** A finite number within [min, max]. */
  numberIn(name: string, min: number, max: number): number {
    const value = this.number(name);
    if (value < min || value > max) this.fail(name, `must be in [${min}, ${max}], got ${value}`);
    return value;
  }

  /** A finite number, or null. */
  numberOrNull(name: string): number | null {
    if (this.#data[name] === null) return null;
    return this.number(name);
  }

  /** An integer within [min, max]; use it for every size before allocating. */
  integer(name: string, min: number, max: number): number {
    const value = this.number(name);
    if (!Number.isInteger(value) || value < min || value > max) this.fail(name, `must be an integer in [${min}, ${max}], got ${value}`);
    return value;
  }

  /** An integer within [min, max], or null. */
  integerOrNull(name: string, min: number, max: number): number | null {
    if (this.#data[name] === null) return null;
    return this.integer(name, min, max);
  }

  /** A boolean. */
  boolean(name: string): boolean {
    const value = this.#data[name];
    if (typeof value !== "boolean") this.fail(name, value === undefined ? "is missing" : `must be a boolean, got ${show(value)}`);
    return value;
  }

  /** A string. */
  string(name: string): string {
    const value = this.#data[name];
    if (typeof value !== "string") this.fail(name, value === undefined ? "is missing" : `must be a string, got ${show(value)}`);
    return value;
  }

  /** A string or null. */
  stringOrNull(name: string): string | null {
    if (this.#data[name] === null) return null;
    return this.string(name);
  }

  /** One of a fixed set of strings. */
  oneOf<T extends string>(name: string, allowed: readonly T[]): T {
    const value = this.string(name);
    if (!allowed.includes(value as T)) this.fail(name, `must be one of ${allowed.map((a) => JSON.stringify(a)).join(", ")}, got ${JSON.stringify(value)}`);
    return value as T;
  }

  /**
   * An array of finite numbers, copied into a Float64Array. `length` is the
   * exact length required, or `{ max }` for a variable length (capped by
   * {@link MAX_SNAPSHOT_ELEMENTS} in every case).
   */
  numbers(name: string, length: number | { min?: number; max: number }): Float64Array {
    const items = this.#array(name, length);
    const out = new Float64Array(items.length);
    for (let i = 0; i < items.length; i++) {
      const v = items[i];
      if (typeof v !== "number" || !Number.isFinite(v)) this.fail(`${name}[${i}]`, `must be a finite number, got ${show(v)}`);
      out[i] = v;
    }
    return out;
  }

  /** An array of integers in [min, max], as a plain number array. */
  integers(name: string, length: number | { min?: number; max: number }, min: number, max: number): number[] {
    const items = this.#array(name, length);
    const out: number[] = new Array(items.length);
    for (let i = 0; i < items.length; i++) {
      const v = items[i];
      if (typeof v !== "number" || !Number.isInteger(v) || v < min || v > max) this.fail(`${name}[${i}]`, `must be an integer in [${min}, ${max}], got ${show(v)}`);
      out[i] = v;
    }
    return out;
  }

  /** An array of strings. */
  strings(name: string, length: number | { min?: number; max: number }): string[] {
    const items = this.#array(name, length);
    return items.map((v, i) => {
      if (typeof v !== "string") this.fail(`${name}[${i}]`, `must be a string, got ${show(v)}`);
      return v;
    });
  }

  /** A nested object, as a reader of its own. */
  object(name: string): SnapshotReader {
    const value = this.#data[name];
    if (!isPlainObject(value)) this.fail(name, value === undefined ? "is missing" : `must be an object, got ${show(value)}`);
    return new SnapshotReader(this.kind, `${this.path}.${name}`, value);
  }

  /** A nested object or null. */
  objectOrNull(name: string): SnapshotReader | null {
    if (this.#data[name] === null) return null;
    return this.object(name);
  }

  /** An array of objects, each as a reader. */
  objects(name: string, length: number | { min?: number; max: number }): SnapshotReader[] {
    const items = this.#array(name, length);
    return items.map((v, i) => {
      if (!isPlainObject(v)) this.fail(`${name}[${i}]`, `must be an object, got ${show(v)}`);
      return new SnapshotReader(this.kind, `${this.path}.${name}[${i}]`, v);
    });
  }

  /** An array of raw values (for nested snapshots restored by their own classes). */
  rawArray(name: string, length: number | { min?: number; max: number }): unknown[] {
    return this.#array(name, length);
  }

  #array(name: string, length: number | { min?: number; max: number }): unknown[] {
    const value = this.#data[name];
    if (!Array.isArray(value)) this.fail(name, value === undefined ? "is missing" : `must be an array, got ${show(value)}`);
    if (typeof length === "number") {
      if (value.length !== length) this.fail(name, `must have length ${length}, got length ${value.length}`);
    } else {
      const max = Math.min(length.max, MAX_SNAPSHOT_ELEMENTS);
      const min = length.min ?? 0;
      if (value.length < min || value.length > max) this.fail(name, `must have a length in [${min}, ${max}], got length ${value.length}`);
    }
    return value;
  }
}

/** Copies a typed array into a plain number array for a snapshot. */
export function toPlainArray(values: ArrayLike<number>, length = values.length): number[] {
  const out: number[] = new Array(length);
  for (let i = 0; i < length; i++) out[i] = values[i] as number;
  return out;
}

/**
 * Caps a size read from options or a snapshot so that nothing absurd is
 * allocated: returns the product of `dims` or throws when it passes `max`.
 */
export function checkedSize(kind: string, path: string, dims: readonly number[], max = MAX_SNAPSHOT_ELEMENTS): number {
  let size = 1;
  for (const d of dims) size *= d;
  if (!(size <= max)) throw new SnapshotError(kind, path, `would allocate ${size} elements, more than the limit of ${max}`);
  return size;
}

function isPlainObject(value: unknown): value is Record<string, unknown> {
  return typeof value === "object" && value !== null && !Array.isArray(value) && !ArrayBuffer.isView(value);
}

function typeName(value: unknown): string {
  if (value === null) return "null";
  if (Array.isArray(value)) return "an array";
  return typeof value;
}

function show(value: unknown): string {
  if (typeof value === "number") return Number.isNaN(value) ? "NaN" : String(value);
  if (typeof value === "string") return JSON.stringify(value.length > 40 ? `${value.slice(0, 37)}...` : value);
  if (value === undefined) return "undefined";
  return typeName(value);
}
