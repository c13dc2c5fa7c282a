import { integerInRange } from "@leeway/core";

/** The largest series length for which {@link kendallUpperTail} computes the exact distribution (N = 79 800 pairs). */
export const KENDALL_EXACT_MAX_N = 400;

/**
 * The exact null distribution of the Mann–Kendall statistic S = Σ_{i<j} sign(x_j − x_i) for a
 * series of n values without ties in random order: `tail[c]` = P(S ≥ N − 2c) for c = 0 … N,
 * N = n(n−1)/2 (Kendall, 1938; Kendall, 1975, ch. 4). S = N − 2I with I the number of
 * inversions of a random permutation, and I is the sum of independent uniform integers on
 * {0, …, k−1}, k = 1 … n; the convolution runs in O(n·N) with a sliding sum.
 *
 * @example
 * Array.from(kendallUpperTail(4), (p) => Math.round(p * 24)); // [1, 4, 9, 15, 20, 23, 24]
 */
export function kendallUpperTail(n: number): Float64Array {
  integerInRange("kendallUpperTail", "n", n, 1, KENDALL_EXACT_MAX_N);
  const pairs = (n * (n - 1)) / 2;
  let p = new Float64Array(pairs + 1);
  let next = new Float64Array(pairs + 1);
  p[0] = 1;
  let top = 0; // the largest I reachable so far
  for (let k = 2; k <= n; k++) {
    // P_k(i) = (1/k) Σ_{j=0}^{k−1} P_{k−1}(i − j)
    const newTop = top + k - 1;
    let window = 0;
    for (let i = 0; i <= newTop; i++) {
      if (i <= top) window += p[i] as number;
      if (i - k >= 0) window -= p[i - k] as number;
      next[i] = window / k;
    }
    [p, next] = [next, p];
    top = newTop;
  }
  // Cumulative from I = 0 upwards: P(I ≤ c) = P(S ≥ N − 2c); the upper half from the symmetry
  // P(I ≤ c) = 1 − P(I ≤ N − 1 − c), so that the tail ends at exactly 1 and stays symmetric.
  const tail = new Float64Array(pairs + 1);
  let sum = 0;
  const half = Math.floor((pairs - 1) / 2);
  for (let c = 0; c <= half; c++) {
    sum += p[c] as number;
    tail[c] = sum;
  }
  for (let c = half + 1; c <= pairs; c++) tail[c] = 1 - (pairs - 1 - c >= 0 ? (tail[pairs - 1 - c] as number) : 0);
  return tail;
}
