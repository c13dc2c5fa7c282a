/**
 * Counts of integer values in [0, size), with the number of counted values below a given one in
 * O(log size): a Fenwick tree (Fenwick, 1994) over the counts. Plain data: the counts themselves
 * (`counts()`) rebuild it.
 */
export class RankCounts {
  readonly size: number;
  readonly #tree: Float64Array; // 1-based Fenwick tree: tree[i] sums counts (i − lowbit(i), i]
  #total = 0;

  constructor(size: number) {
    this.size = size;
    this.#tree = new Float64Array(size + 1);
  }

  /** Values counted so far. */
  get total(): number {
    return this.#total;
  }

  /** Counts one more `value` (an integer in [0, size)). */
  add(value: number): void {
    const tree = this.#tree;
    for (let i = value + 1; i <= this.size; i += i & -i) tree[i] = (tree[i] as number) + 1;
    this.#total++;
  }

  /** The number of counted values < `value` (an integer in [0, size]). */
  below(value: number): number {
    const tree = this.#tree;
    let sum = 0;
    for (let i = value; i > 0; i -= i & -i) sum += tree[i] as number;
    return sum;
  }

  /** Forgets every count. */
  clear(): void {
    this.#tree.fill(0);
    this.#total = 0;
  }

  /** The count of each value 0 … size − 1, as plain numbers. */
  counts(): number[] {
    const out: number[] = new Array(this.size);
    for (let v = 0; v < this.size; v++) out[v] = this.below(v + 1) - this.below(v);
    return out;
  }

  /** A tree holding the given counts per value. */
  static from(counts: ArrayLike<number>): RankCounts {
    const r = new RankCounts(counts.length);
    const tree = r.#tree;
    let total = 0;
    for (let v = 0; v < counts.length; v++) {
      const c = counts[v] as number;
      total += c;
      // linear-time build: each node passes its sum on to its parent
      tree[v + 1] = (tree[v + 1] as number) + c;
      const parent = v + 1 + ((v + 1) & -(v + 1));
      if (parent <= r.size) tree[parent] = (tree[parent] as number) + (tree[v + 1] as number);
    }
    r.#total = total;
    return r;
  }
}
