/**
 * The k-th smallest element (0-based) of `values[0..length)`, found in place
 * by Hoare's selection (Hoare, 1961) with a median-of-three pivot; expected
 * O(length). Reorders `values`.
 */
export function selectInPlace(values: Float64Array, k: number, length = values.length): number {
  let lo = 0;
  let hi = length - 1;
  while (hi > lo) {
    const mid = (lo + hi) >>> 1;
    // Median of three as the pivot keeps sorted and reversed input linear.
    const a = values[lo] as number;
    const b = values[mid] as number;
    const c = values[hi] as number;
    const pivot = a < b ? (b < c ? b : a < c ? c : a) : a < c ? a : b < c ? c : b;
    let i = lo;
    let j = hi;
    while (i <= j) {
      while ((values[i] as number) < pivot) i++;
      while ((values[j] as number) > pivot) j--;
      if (i <= j) {
        const t = values[i] as number;
        values[i] = values[j] as number;
        values[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return values[k] as number;
  }
  return values[k] as number;
}

/** The median of `values[0..length)` (mean of the two middle ones for an even length); reorders `values`. */
export function medianInPlace(values: Float64Array, length = values.length): number {
  if (length === 0) return Number.NaN;
  const half = length >>> 1;
  const upper = selectInPlace(values, half, length);
  if (length % 2 === 1) return upper;
  // After selecting `half`, everything left of it is ≤ upper: the lower middle is their maximum.
  let lower = -Infinity;
  for (let i = 0; i < half; i++) if ((values[i] as number) > lower) lower = values[i] as number;
  return lower + (upper - lower) / 2;
}
