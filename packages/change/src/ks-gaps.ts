import { MaxAddTree } from "./max-add-tree.js";

/**
 * The two one-sided Kolmogorov-Smirnov distances between a fixed reference sample (n values) and a
 * recent sample of m values that changes one value at a time, kept in O(log k) per change (k distinct
 * reference values) instead of a merge of both sorted samples per test.
 *
 * Method: between two neighbouring distinct reference values r_a ≤ x < r_(a+1) the reference's
 * empirical distribution function is flat and F_ref − F_recent only falls as x grows, so its largest
 * value on that span is reached at r_a and its smallest just below r_(a+1). Scaled by nm, with
 * I_a = #{ref ≤ r_a}, both are integers:
 *   above_a = I_a·m − #{recent ≤ r_a}·n      (nm·(F_ref − F_recent) at r_a)
 *   below_a = #{recent < r_a}·n − I_(a−1)·m  (nm·(F_recent − F_ref) just below r_a; I_(−1) = 0)
 * and D⁺ = max(0, maxₐ above_a)/(nm), D⁻ = max(0, maxₐ below_a)/(nm), the same suprema a merge of the
 * two samples finds (ties stepped together). Adding a recent value x subtracts n from above_a for
 * every r_a ≥ x and adds n to below_a for every r_a > x: a range addition on each of two
 * {@link MaxAddTree}s. Every key is an integer below 2^43, so the maxima are exact.
 */
export class KsGaps {
  readonly #levels: Float64Array; // distinct reference values, ascending
  readonly #n: number;
  readonly #m: number;
  readonly #above: MaxAddTree;
  readonly #below: MaxAddTree;

  /**
   * @param sortedReference the reference sample, sorted ascending (not copied; not changed later).
   * @param m the size of the recent sample at which the distances are read.
   */
  constructor(sortedReference: Float64Array, m: number) {
    const n = sortedReference.length;
    const levels: number[] = [];
    const atOrBelow: number[] = []; // I_a
    for (let i = 0; i < n; i++) {
      const v = sortedReference[i] as number;
      if (levels.length > 0 && levels[levels.length - 1] === v) atOrBelow[atOrBelow.length - 1] = i + 1;
      else {
        levels.push(v);
        atOrBelow.push(i + 1);
      }
    }
    const k = levels.length;
    const above = new Float64Array(k);
    const below = new Float64Array(k);
    for (let a = 0; a < k; a++) {
      above[a] = (atOrBelow[a] as number) * m;
      below[a] = -(a === 0 ? 0 : (atOrBelow[a - 1] as number)) * m;
    }
    this.#levels = Float64Array.from(levels);
    this.#n = n;
    this.#m = m;
    this.#above = new MaxAddTree(above);
    this.#below = new MaxAddTree(below);
  }

  /**
   * Where `x` falls among the reference levels, as 2·a + e: a = #{levels < x}, e = 1 when x equals
   * level a. Pass it to {@link KsGaps.move}.
   */
  place(x: number): number {
    const levels = this.#levels;
    let lo = 0;
    let hi = levels.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if ((levels[mid] as number) < x) lo = mid + 1;
      else hi = mid;
    }
    return 2 * lo + (lo < levels.length && levels[lo] === x ? 1 : 0);
  }

  /** Adds a recent value at `place` (from {@link KsGaps.place}). */
  add(place: number): void {
    this.move(-1, place);
  }

  /** Moves one recent value from place `from` to place `to`; −1 for "none" on either side. */
  move(from: number, to: number): void {
    const k = this.#levels.length;
    const n = this.#n;
    // #{recent ≤ r_a} counts a value from level a = ⌊place/2⌋ up; #{recent < r_a} from a = ⌊place/2⌋ + e up
    const fromAtOrAbove = from < 0 ? k : from >> 1;
    const toAtOrAbove = to < 0 ? k : to >> 1;
    const fromAbove = from < 0 ? k : (from >> 1) + (from & 1);
    const toAbove = to < 0 ? k : (to >> 1) + (to & 1);
    if (toAtOrAbove < fromAtOrAbove) this.#above.add(toAtOrAbove, fromAtOrAbove, -n);
    else this.#above.add(fromAtOrAbove, toAtOrAbove, n);
    if (toAbove < fromAbove) this.#below.add(toAbove, fromAbove, n);
    else this.#below.add(fromAbove, toAbove, -n);
  }

  /** Forgets every recent value. */
  clear(): void {
    this.#above.reset();
    this.#below.reset();
  }

  /** nm·D⁺ = nm·max(0, sup (F_ref − F_recent)): an integer. */
  get aboveKey(): number {
    const v = this.#above.max;
    return v > 0 ? v : 0;
  }

  /** nm·D⁻ = nm·max(0, sup (F_recent − F_ref)): an integer. */
  get belowKey(): number {
    const v = this.#below.max;
    return v > 0 ? v : 0;
  }

  /** nm, the scale of the keys. */
  get scale(): number {
    return this.#n * this.#m;
  }
}
