import { NonFiniteError, type NonFinitePolicy } from "@leeway/core";

/**
 * The non-finite policy for one sample: true when `x` is finite (take it),
 * false when it is to be skipped (and counted by the caller) under
 * `"skip"`; throws {@link NonFiniteError} naming `component` under `"refuse"`.
 */
export function acceptSample(component: string, policy: NonFinitePolicy, x: number): boolean {
  if (Number.isFinite(x)) return true;
  if (policy === "refuse") throw new NonFiniteError(component, "x", x);
  return false;
}

/**
 * Feeds a batch through `run`, which takes samples until the first
 * non-finite one and returns its index (xs.length when all are finite);
 * each non-finite sample goes to `one` (which refuses or skips it, as
 * `observe` would), and the rest of the batch continues after it.
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
