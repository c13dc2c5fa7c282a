import { NonFiniteError, SampleError, type NonFinitePolicy } from "@leeway/core";

/**
 * The largest |x| a component that does arithmetic on its samples takes:
 * 10¹⁰⁰. Squares of larger samples, and sums of 2⁵³ such squares, could
 * overflow to Infinity and leave a state that no snapshot can hold. Larger
 * finite samples are refused with `SampleError` (`E_SAMPLE`) whatever the
 * non-finite policy; no score comes near it.
 * @example
 * MAX_SAMPLE_MAGNITUDE; // 1e100
 */
export const MAX_SAMPLE_MAGNITUDE = 1e100;

/**
 * The sample check every stats and change component applies before any
 * arithmetic: true when `x` is a finite number with |x| ≤ `limit`: take it;
 * false when it is NaN or ±Infinity under `"skip"` (the caller counts it).
 * Throws `SampleError` (`E_SAMPLE`) for a value that is not a number (null,
 * a string, an array, ...) and for a finite number beyond `limit`, and
 * `NonFiniteError` (`E_NON_FINITE`) for NaN or ±Infinity under `"refuse"`;
 * every message names `component` and `parameter`.
 * @example
 * acceptSample("MyChart", "x", "refuse", 2.5); // true
 * acceptSample("MyChart", "x", "skip", Number.NaN); // false
 */
export function acceptSample(component: string, parameter: string, policy: NonFinitePolicy, x: unknown, limit = Infinity): boolean {
  if (typeof x !== "number") throw new SampleError(component, parameter, x, "a number");
  if (Math.abs(x) <= limit && x - x === 0) return true;
  if (x - x === 0) throw new SampleError(component, parameter, x, `a finite number in [${-limit}, ${limit}]`);
  if (policy === "refuse") throw new NonFiniteError(component, parameter, x);
  return false;
}

/**
 * Feeds a batch through `run`, which takes samples until the first one it
 * does not take (non-finite, or beyond its range) and returns its index
 * (xs.length when it took all); each such sample goes to `one` (which
 * refuses or skips it, as `observe` would), and the rest of the batch
 * continues after it.
 */
export function runBatch(xs: Float64Array, run: (xs: Float64Array) => number, one: (x: number) => void): void {
  let rest = xs;
  for (;;) {
    const stop = run(rest);
    if (stop === rest.length) return;
    one(rest[stop] as number);
    rest = rest.subarray(stop + 1);
  }
}

/**
 * The batch check of `observeMany` and `scan`: returns `xs` when it is a
 * `Float64Array`; anything else (a plain array, a Float32Array, a string)
 * throws `SampleError` (`E_SAMPLE`) naming `component` and `parameter`, so
 * that no element is ever coerced by arithmetic.
 * @example
 * requireBatch("MyChart", new Float64Array(2)).length; // 2
 */
export function requireBatch(component: string, xs: unknown, parameter = "xs"): Float64Array {
  if (!(xs instanceof Float64Array)) throw new SampleError(component, parameter, xs, "a Float64Array");
  return xs;
}
