/**
 * Stable error codes. Hosts may switch on `error.code`; messages may change
 * wording between versions, codes never do.
 */
export type ErrorCode = "E_OPTION" | "E_NON_FINITE" | "E_SAMPLE" | "E_DIMENSION" | "E_SNAPSHOT" | "E_STATE";

/** Base class of every error leeway throws on purpose. */
export class LeewayError extends Error {
  readonly code: ErrorCode;
  constructor(code: ErrorCode, message: string) {
    super(message);
    this.name = new.target.name;
    this.code = code;
  }
}

/**
 * An option (or a function argument that acts as one) is missing or out of range.
 * A value that is not a number is shown with its type.
 * @example
 * new OptionError("Cusum", "h", -1, "a finite number > 0").message;
 * // "Cusum: option h must be a finite number > 0, got -1"
 * new OptionError("Cusum", "h", "5", "a finite number > 0").message;
 * // 'Cusum: option h must be a finite number > 0, got "5" (string)'
 */
export class OptionError extends LeewayError {
  readonly component: string;
  readonly option: string;
  constructor(component: string, option: string, value: unknown, allowed: string) {
    super("E_OPTION", `${component}: option ${option} must be ${allowed}, got ${describeValue(value)}${typeNote(value)}`);
    this.component = component;
    this.option = option;
  }
}

/**
 * A sample (or an element of one) is NaN or ±Infinity.
 * @example
 * new NonFiniteError("Moments", "x", NaN).message;
 * // "Moments: x must be a finite number, got NaN"
 */
export class NonFiniteError extends LeewayError {
  constructor(component: string, parameter: string, value: unknown) {
    super("E_NON_FINITE", `${component}: ${parameter} must be a finite number, got ${describeValue(value)}`);
  }
}

/**
 * A sample (or an element of one) is not a number at all (a string, null, an
 * array, ...), or is a finite number outside the range the component states it
 * accepts. Never coerced, never skipped: `nonFinite: "skip"` covers only NaN and ±Infinity.
 * @example
 * new SampleError("Moments", "x", "5", "a number").message;
 * // 'Moments: x must be a number, got "5" (string)'
 */
export class SampleError extends LeewayError {
  constructor(component: string, parameter: string, value: unknown, allowed: string) {
    super("E_SAMPLE", `${component}: ${parameter} must be ${allowed}, got ${describeValue(value)}${typeNote(value)}`);
  }
}

/**
 * A vector or matrix has the wrong length or shape.
 * @example
 * new DimensionError("OselmAutoencoder", "x", 256, 255).message;
 * // "OselmAutoencoder: x must have length 256, got length 255"
 */
export class DimensionError extends LeewayError {
  readonly expected: number;
  readonly received: number;
  constructor(component: string, parameter: string, expected: number, received: number) {
    super("E_DIMENSION", `${component}: ${parameter} must have length ${expected}, got length ${received}`);
    this.expected = expected;
    this.received = received;
  }
}

/**
 * A snapshot cannot be restored: wrong kind, unsupported version, a missing or
 * malformed field, a non-finite number or an absurd size. Restoring is all or
 * nothing: no half-built component ever escapes.
 */
export class SnapshotError extends LeewayError {
  constructor(kind: string, path: string, problem: string) {
    super("E_SNAPSHOT", `snapshot of ${kind}: ${path} ${problem}`);
  }
}

/** An operation is not allowed in the component's present state (or would corrupt it). */
export class StateError extends LeewayError {
  constructor(component: string, message: string) {
    super("E_STATE", `${component}: ${message}`);
  }
}

/** " (string)", " (null)", ...: the type a message adds after a value that is not a number. */
function typeNote(value: unknown): string {
  return typeof value === "number" ? "" : ` (${typeOf(value)})`;
}

/** The type of a value as a message names it: "null", "array", "Float32Array", "string", ... */
export function typeOf(value: unknown): string {
  if (value === null) return "null";
  if (Array.isArray(value)) return "array";
  if (ArrayBuffer.isView(value)) return value.constructor.name;
  return typeof value;
}

/** A short, readable rendering of any value for error messages. */
export function describeValue(value: unknown): string {
  if (typeof value === "number") {
    if (Number.isNaN(value)) return "NaN";
    if (Object.is(value, -0)) return "-0";
    return String(value);
  }
  if (typeof value === "string") return JSON.stringify(value.length > 60 ? `${value.slice(0, 57)}...` : value);
  if (value === null) return "null";
  if (value === undefined) return "undefined";
  if (typeof value === "bigint") return `${value}n`;
  if (typeof value === "boolean") return String(value);
  if (typeof value === "function") return "a function";
  if (Array.isArray(value)) return `an array of length ${value.length}`;
  if (ArrayBuffer.isView(value)) {
    const name = value.constructor.name;
    const length = "length" in value ? String((value as unknown as { length: number }).length) : "?";
    return `a ${name} of length ${length}`;
  }
  return "an object";
}
