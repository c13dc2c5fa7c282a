/**
 * A segment tree over a fixed number of numeric slots with "add d to every slot in [l, r)" and
 * "largest slot" both in O(log k): each node holds the largest value below it plus the additions
 * still pending at the node itself, so nothing is pushed down (the bottom-up layout of a segment
 * tree, padded to a power of two with −∞ slots). With integer slots and additions below 2^53 every
 * value is exact.
 */
export class MaxAddTree {
  /** Slots k. */
  readonly size: number;
  readonly #leaves: number; // power of two ≥ size; leaf of slot i is node leaves + i
  readonly #max: Float64Array; // node p: max over its leaves, including the additions pending at p and below
  readonly #pending: Float64Array; // inner node p: the addition applied to all of its leaves and not below it
  readonly #initial: Float64Array; // the slots as built, for reset()

  /** A tree over `values` (copied). */
  constructor(values: Float64Array) {
    this.size = values.length;
    let leaves = 1;
    while (leaves < values.length) leaves <<= 1;
    this.#leaves = leaves;
    this.#max = new Float64Array(2 * leaves);
    this.#pending = new Float64Array(leaves);
    this.#initial = Float64Array.from(values);
    this.reset();
  }

  /** The largest slot (−∞ for an empty tree). */
  get max(): number {
    return this.#max[1] as number;
  }

  /** Puts every slot back to its value at construction. */
  reset(): void {
    const leaves = this.#leaves;
    const max = this.#max;
    max.fill(-Infinity, leaves);
    max.set(this.#initial, leaves);
    this.#pending.fill(0);
    for (let p = leaves - 1; p >= 1; p--) {
      const a = max[2 * p] as number;
      const b = max[2 * p + 1] as number;
      max[p] = a >= b ? a : b;
    }
  }

  /** Adds `d` to the slots l … r − 1 (0 ≤ l ≤ r ≤ size). */
  add(l: number, r: number, d: number): void {
    if (l >= r) return;
    const max = this.#max;
    const pending = this.#pending;
    const leaves = this.#leaves;
    let lo = l + leaves;
    let hi = r + leaves;
    const left = lo;
    const right = hi - 1;
    // the canonical cover of [l, r): at most two nodes per level
    while (lo < hi) {
      if ((lo & 1) === 1) {
        max[lo] = (max[lo] as number) + d;
        if (lo < leaves) pending[lo] = (pending[lo] as number) + d;
        lo++;
      }
      if ((hi & 1) === 1) {
        hi--;
        max[hi] = (max[hi] as number) + d;
        if (hi < leaves) pending[hi] = (pending[hi] as number) + d;
      }
      lo >>= 1;
      hi >>= 1;
    }
    // only the ancestors of the two end leaves cover part of the range: recompute them, once each
    rebuildAbove(max, pending, left, right);
  }
}

/** Recomputes every ancestor of the leaves `left` and `right` (same depth), bottom up. */
function rebuildAbove(max: Float64Array, pending: Float64Array, left: number, right: number): void {
  let p = left >> 1;
  let q = right >> 1;
  for (; p !== q; p >>= 1, q >>= 1) {
    max[p] = maxPlus(max, pending, p);
    max[q] = maxPlus(max, pending, q);
  }
  for (; p >= 1; p >>= 1) max[p] = maxPlus(max, pending, p);
}

function maxPlus(max: Float64Array, pending: Float64Array, p: number): number {
  const a = max[2 * p] as number;
  const b = max[2 * p + 1] as number;
  return (a >= b ? a : b) + (pending[p] as number);
}
