import { DimensionError, NonFiniteError, OptionError, SampleError } from "./errors.js";

/**
 * Option validation shared by every package. Each helper returns the value
 * (narrowed) or throws an {@link OptionError} that names the component, the
 * option, the value received and what is allowed.
 */

/** A finite number. */
export function finiteNumber(component: string, option: string, value: unknown): number {
  if (typeof value !== "number" || !Number.isFinite(value)) throw new OptionError(component, option, value, "a finite number");
  return value;
}

/** A finite number > 0. */
export function positiveNumber(component: string, option: string, value: unknown): number {
  if (typeof value !== "number" || !Number.isFinite(value) || value <= 0) throw new OptionError(component, option, value, "a finite number > 0");
  return value;
}

/** A finite number ≥ 0. */
export function nonNegativeNumber(component: string, option: string, value: unknown): number {
  if (typeof value !== "number" || !Number.isFinite(value) || value < 0) throw new OptionError(component, option, value, "a finite number >= 0");
  return value;
}

/** Bounds for {@link numberInRange}; an exclusive bound is written with `(` or `)` in messages. */
export interface RangeBounds {
  min?: number;
  max?: number;
  minExclusive?: boolean;
  maxExclusive?: boolean;
}

/** A finite number inside the given bounds. */
export function numberInRange(component: string, option: string, value: unknown, bounds: RangeBounds): number {
  const { min = -Infinity, max = Infinity, minExclusive = false, maxExclusive = false } = bounds;
  const ok =
    typeof value === "number" &&
    Number.isFinite(value) &&
    (minExclusive ? value > min : value >= min) &&
    (maxExclusive ? value < max : value <= max);
  if (!ok) throw new OptionError(component, option, value, `a finite number in ${rangeText(bounds)}`);
  return value as number;
}

/** An integer inside [min, max] (both inclusive). */
export function integerInRange(component: string, option: string, value: unknown, min: number, max: number): number {
  if (typeof value !== "number" || !Number.isInteger(value) || value < min || value > max) {
    throw new OptionError(component, option, value, `an integer in [${min}, ${max}]`);
  }
  return value;
}

/** An integer ≥ 1 and ≤ max (default: 2^31 − 1). */
export function positiveInteger(component: string, option: string, value: unknown, max = 2 ** 31 - 1): number {
  return integerInRange(component, option, value, 1, max);
}

/** An integer ≥ 0 and ≤ max (default: 2^31 − 1). */
export function nonNegativeInteger(component: string, option: string, value: unknown, max = 2 ** 31 - 1): number {
  return integerInRange(component, option, value, 0, max);
}

/** One of a fixed set of strings (or other primitives). */
export function oneOf<T extends string | number | boolean>(component: string, option: string, value: unknown, allowed: readonly T[]): T {
  if (!allowed.includes(value as T)) {
    throw new OptionError(component, option, value, `one of ${allowed.map((a) => JSON.stringify(a)).join(", ")}`);
  }
  return value as T;
}

/** A boolean. */
export function booleanOption(component: string, option: string, value: unknown): boolean {
  if (typeof value !== "boolean") throw new OptionError(component, option, value, "true or false");
  return value;
}

/** A seed for {@link RandomSource}: a finite number or a non-empty string. */
export function seedOption(component: string, option: string, value: unknown): number | string {
  if ((typeof value === "number" && Number.isFinite(value)) || (typeof value === "string" && value.length > 0)) return value;
  throw new OptionError(component, option, value, "a finite number or a non-empty string");
}

/**
 * An array (or typed array) of finite numbers, optionally of an exact length
 * or with a minimum length. Returns a fresh Float64Array copy.
 */
export function finiteArray(
  component: string,
  option: string,
  value: unknown,
  length?: { exactly?: number; atLeast?: number; atMost?: number },
): Float64Array {
  const isArrayLike = Array.isArray(value) || (ArrayBuffer.isView(value) && !(value instanceof DataView));
  if (!isArrayLike) throw new OptionError(component, option, value, "an array of finite numbers");
  const items = value as ArrayLike<unknown>;
  if (length?.exactly !== undefined && items.length !== length.exactly) {
    throw new OptionError(component, option, value, `an array of exactly ${length.exactly} finite numbers`);
  }
  if (length?.atLeast !== undefined && items.length < length.atLeast) {
    throw new OptionError(component, option, value, `an array of at least ${length.atLeast} finite numbers`);
  }
  if (length?.atMost !== undefined && items.length > length.atMost) {
    throw new OptionError(component, option, value, `an array of at most ${length.atMost} finite numbers`);
  }
  const out = new Float64Array(items.length);
  for (let i = 0; i < items.length; i++) {
    const v = items[i];
    if (typeof v !== "number" || !Number.isFinite(v)) throw new OptionError(component, `${option}[${i}]`, v, "a finite number");
    out[i] = v;
  }
  return out;
}

/**
 * Checks that an options value is a plain object and that it names no key
 * outside `known`, so that a misspelt option is an error instead of a silent default.
 */
export function optionsObject<T extends object>(component: string, options: unknown, known: readonly string[]): T {
  if (options === undefined) return {} as T;
  if (typeof options !== "object" || options === null || Array.isArray(options)) {
    throw new OptionError(component, "options", options, "an options object");
  }
  for (const key of Object.keys(options)) {
    if (!known.includes(key)) throw new OptionError(component, key, (options as Record<string, unknown>)[key], `one of the known options (${known.join(", ")}); it is not an option`);
  }
  return options as T;
}

/** What a component does with NaN or ±Infinity samples. */
export type NonFinitePolicy = "refuse" | "skip";

/** Validates the `nonFinite` option; default `"refuse"`. */
export function nonFiniteOption(component: string, value: unknown): NonFinitePolicy {
  if (value === undefined) return "refuse";
  return oneOf(component, "nonFinite", value, ["refuse", "skip"] as const);
}

/**
 * True when `x` is of type number (NaN and ±Infinity included): the test every
 * sample passes before a component's `nonFinite` policy looks at it.
 * @example
 * [isNumber(5), isNumber(Number.NaN), isNumber("5"), isNumber(null)]; // [true, true, false, false]
 */
export function isNumber(x: unknown): x is number {
  return typeof x === "number";
}

/**
 * Returns `x` when it is of type number (NaN and ±Infinity pass: the
 * component's `nonFinite` policy decides about them); otherwise throws
 * {@link SampleError} (`E_SAMPLE`) naming the parameter and the type received.
 * Nothing is coerced: `"5"`, `null`, `[7]` and `true` are refused.
 * @example
 * requireNumber("Moments", "x", 2.5); // 2.5
 * requireNumber("Moments", "x", "5"); // throws: Moments: x must be a number, got "5" (string)
 */
export function requireNumber(component: string, parameter: string, x: unknown): number {
  if (typeof x !== "number") throw new SampleError(component, parameter, x, "a number");
  return x;
}

/**
 * Checks a vector sample: a Float64Array or Float32Array passes at once; a
 * plain array passes when every element is of type number (non-finite
 * elements are left to the caller's `nonFinite` policy). Anything else, or a
 * non-number element, throws {@link SampleError} (`E_SAMPLE`) naming the
 * parameter (and the element's index); a wrong length, when `length` is given,
 * throws {@link DimensionError} (`E_DIMENSION`).
 * @example
 * requireNumbers("OselmAutoencoder", "x", [1, 2], 2).length; // 2
 * requireNumbers("OselmAutoencoder", "x", [1, "2"]); // throws: OselmAutoencoder: x[1] must be a number, got "2" (string)
 */
export function requireNumbers(component: string, parameter: string, xs: unknown, length?: number): ArrayLike<number> {
  if (!(xs instanceof Float64Array || xs instanceof Float32Array)) {
    if (!Array.isArray(xs)) throw new SampleError(component, parameter, xs, "a Float64Array, a Float32Array or an array of numbers");
    for (let i = 0; i < xs.length; i++) {
      if (typeof xs[i] !== "number") throw new SampleError(component, `${parameter}[${i}]`, xs[i], "a number");
    }
  }
  if (length !== undefined && xs.length !== length) throw new DimensionError(component, parameter, length, xs.length);
  return xs as ArrayLike<number>;
}

/**
 * A series of samples given to a whole-series function (a trend test, a
 * calibration), copied into a fresh Float64Array. Anything but an array or a
 * typed array of numbers is a {@link SampleError} (`E_SAMPLE`) naming the
 * parameter (or the element, by index) and the type received; NaN or
 * ±Infinity is a {@link NonFiniteError} (`E_NON_FINITE`) naming its index.
 * @example
 * finiteSamples("mannKendall", "values", [1, 2, 3]).length; // 3
 * finiteSamples("mannKendall", "values", [1, false]); // throws: mannKendall: values[1] must be a finite number, got false (boolean)
 */
export function finiteSamples(component: string, parameter: string, values: unknown): Float64Array {
  if (values instanceof Float64Array || values instanceof Float32Array || Array.isArray(values)) {
    const items = values as ArrayLike<unknown>;
    const out = new Float64Array(items.length);
    for (let i = 0; i < items.length; i++) {
      const v = items[i];
      if (typeof v !== "number") throw new SampleError(component, `${parameter}[${i}]`, v, "a finite number");
      if (v - v !== 0) throw new NonFiniteError(component, `${parameter}[${i}]`, v);
      out[i] = v;
    }
    return out;
  }
  throw new SampleError(component, parameter, values, "a Float64Array, a Float32Array or an array of finite numbers");
}

/**
 * Returns `x` when it is a finite number with |x| ≤ `limit`; a non-number or a
 * finite number beyond the limit throws {@link SampleError} (`E_SAMPLE`)
 * stating the range, NaN/±Infinity throw {@link NonFiniteError}
 * (`E_NON_FINITE`). For components whose state would overflow past a stated range.
 * @example
 * sampleWithin("Cusum", "x", 3, 1e150); // 3
 * sampleWithin("Cusum", "x", 1e200, 1e150); // throws: Cusum: x must be a finite number in [-1e+150, 1e+150], got 1e+200
 */
export function sampleWithin(component: string, parameter: string, x: unknown, limit: number): number {
  if (typeof x !== "number") throw new SampleError(component, parameter, x, "a number");
  if (!Number.isFinite(x)) throw new NonFiniteError(component, parameter, x);
  if (!(Math.abs(x) <= limit)) throw new SampleError(component, parameter, x, `a finite number in [${-limit}, ${limit}]`);
  return x;
}

/** Throws {@link NonFiniteError} unless `x` is a finite number. */
export function requireFinite(component: string, parameter: string, x: number): number {
  if (!Number.isFinite(x)) throw new NonFiniteError(component, parameter, x);
  return x;
}

function rangeText({ min = -Infinity, max = Infinity, minExclusive = false, maxExclusive = false }: RangeBounds): string {
  return `${minExclusive ? "(" : "["}${min}, ${max}${maxExclusive ? ")" : "]"}`;
}
