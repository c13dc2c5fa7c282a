/**
 * The windowed KS test as it was before its gaps were kept in segment trees, kept here as the
 * bench's baseline: a sorted copy of the recent window maintained by binary search and
 * `copyWithin` (O(w) per sample), and one merge of both sorted samples per test (O(n + w)).
 * Only the per-sample work of `scan` is kept (no snapshot, no readings).
 */
export class MergeSlidingKs {
  readonly #w: number;
  readonly #critical: number;
  readonly #reference: Float64Array;
  #referenceCount = 0;
  readonly #ring: Float64Array;
  #ringStart = 0;
  #recentCount = 0;
  readonly #sorted: Float64Array;
  #statistic = 0;
  #count = 0;

  constructor(recentSize: number, referenceSize: number, criticalD: number) {
    this.#w = recentSize;
    this.#critical = criticalD;
    this.#reference = new Float64Array(referenceSize);
    this.#ring = new Float64Array(recentSize);
    this.#sorted = new Float64Array(recentSize);
  }

  get statistic(): number {
    return this.#statistic;
  }

  scan(xs: Float64Array): number {
    for (let j = 0; j < xs.length; j++) {
      const x = xs[j] as number;
      if (!(x - x === 0)) throw new Error(`xs[${j}] is not finite`);
      this.#step(x);
      if (this.#statistic > this.#critical) return j;
    }
    return -1;
  }

  #step(x: number): void {
    this.#count += 1;
    if (this.#referenceCount < this.#reference.length) {
      this.#reference[this.#referenceCount++] = x;
      if (this.#referenceCount === this.#reference.length) this.#reference.sort();
      return;
    }
    const w = this.#w;
    const sorted = this.#sorted;
    if (this.#recentCount < w) {
      this.#ring[(this.#ringStart + this.#recentCount) % w] = x;
      insertSorted(sorted, this.#recentCount, x);
      this.#recentCount += 1;
      if (this.#recentCount === w) this.#test();
      return;
    }
    const old = this.#ring[this.#ringStart] as number;
    this.#ring[this.#ringStart] = x;
    this.#ringStart = (this.#ringStart + 1) % w;
    removeSorted(sorted, w, old);
    insertSorted(sorted, w - 1, x);
    this.#test();
  }

  #test(): void {
    const a = this.#reference;
    const b = this.#sorted;
    const n = a.length;
    const m = this.#w;
    const invN = 1 / n;
    const invM = 1 / m;
    let i = 0;
    let j = 0;
    let high = 0;
    let low = 0;
    while (i < n && j < m) {
      const x = a[i] as number;
      const y = b[j] as number;
      const v = x <= y ? x : y;
      while (i < n && (a[i] as number) === v) i++;
      while (j < m && (b[j] as number) === v) j++;
      const gap = i * invN - j * invM;
      if (gap > high) high = gap;
      if (-gap > low) low = -gap;
    }
    this.#statistic = high >= low ? high : low;
  }
}

function insertSorted(a: Float64Array, length: number, x: number): void {
  let lo = 0;
  let hi = length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if ((a[mid] as number) < x) lo = mid + 1;
    else hi = mid;
  }
  a.copyWithin(lo + 1, lo, length);
  a[lo] = x;
}

function removeSorted(a: Float64Array, length: number, x: number): void {
  let lo = 0;
  let hi = length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if ((a[mid] as number) < x) lo = mid + 1;
    else hi = mid;
  }
  a.copyWithin(lo, lo + 1, length);
}
