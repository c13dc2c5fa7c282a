import { NonFiniteError, type NonFinitePolicy } from "@leeway/core";

/**
 * The largest |x| the moment accumulators take: squares of larger samples
 * (and sums of them) could overflow to Infinity. Larger samples fall under
 * the non-finite policy.
 */
export const MAX_SAMPLE_MAGNITUDE = 1e100;

/**
 * The non-finite policy for one sample: true when `x` is finite (and, with a
 * `limit`, |x| ≤ limit): take it; false when it is to be skipped (and
 * counted by the caller) under `"skip"`; throws {@link NonFiniteError}
 * naming `component` under `"refuse"`.
 */
export function acceptSample(component: string, policy: NonFinitePolicy, x: number, limit = Infinity): boolean {
  if (Math.abs(x) <= limit && Number.isFinite(x)) return true;
  if (policy === "refuse") throw new NonFiniteError(component, Number.isFinite(x) ? `x (|x| <= ${limit})` : "x", x);
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
