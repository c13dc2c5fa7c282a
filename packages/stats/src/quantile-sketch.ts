import { acceptSample, requireBatch } from "./samples.js";
import {
  envelope,
  integerInRange,
  nonFiniteOption,
  numberInRange,
  openSnapshot,
  optionsObject,
  OptionError,
  RandomSource,
  seedOption,
  SampleError,
  SnapshotError,
  StateError,
  toPlainArray,
  type NonFinitePolicy,
  type RandomSourceState,
  type Snapshot,
} from "@leeway/core";

/** Options of {@link QuantileSketch}. */
export interface QuantileSketchOptions {
  /** Capacity of the top compactor, an integer in [8, 65536] (default 200); the rank error shrinks like 1/k. */
  k?: number;
  /** Seed of the random source that picks which half of each compacted buffer survives. */
  seed: number | string;
  /** What to do with NaN or ±Infinity samples: `"refuse"` (default) throws, `"skip"` counts them. */
  nonFinite?: NonFinitePolicy;
}

/** What {@link QuantileSketch.observe} returns. */
export interface QuantileSketchReading {
  count: number;
  /** Items the sketch holds now. */
  retained: number;
  skipped: number;
}

/** The plain state inside a {@link QuantileSketch} snapshot. */
export interface QuantileSketchState {
  k: number;
  nonFinite: NonFinitePolicy;
  count: number;
  skipped: number;
  min: number | null;
  max: number | null;
  /** Σ 4^h over every compaction so far (h its level): the variance bound of the rank error, in samples². */
  errorVariance: number;
  /** Compactor h holds items of weight 2^h; level 0 in arrival order, the others sorted. */
  levels: { items: number[] }[];
  random: Snapshot<RandomSourceState>;
  /** Unused coin flips: `coinCount` low bits of `coinBits`, drawn 32 at a time from the random source. */
  coinBits: number;
  coinCount: number;
}

const MIN_LEVEL_CAPACITY = 8;
const MAX_LEVELS = 64;

/**
 * A mergeable sketch of a score stream's distribution: quantiles and ranks
 * from a few k·log(n/k) retained samples, with a computed rank-error bound.
 *
 * Method: the KLL sketch (Karnin, Lang & Liberty, 2016) with lazy compaction
 * (Ivkin, Liberty, Lang, Karnin & Braverman, 2019). Compactor h holds items of
 * weight 2^h and has capacity max(8, ⌈k·(2/3)^(H−1−h)⌉), H the number of
 * compactors. When the sketch holds as many items as all capacities together,
 * the lowest full compactor is sorted and every second item (starting at a
 * random offset 0 or 1 drawn from the seeded {@link RandomSource}) moves up
 * one level (the coin flips are the bits of uniform draws, 32 per draw); an
 * odd item out stays. Total weight stays exactly n.
 *
 * Error bound: for any fixed x, a compaction at level h changes the estimated
 * rank of x by 0 or ±2^h with equal odds, independently of the past, and which
 * compactions happen depends only on n, not on the data or the coin flips.
 * By the Azuma–Hoeffding inequality, |estimated − true rank| ≤
 * √(2·V·ln(2/δ)) with probability ≥ 1 − δ, where V = Σ 4^h over the
 * compactions so far; {@link QuantileSketch.rankErrorBound} returns this,
 * divided by n. For k = 200 it is about 0.01–0.02 at δ = 0.01 (measured in
 * the tests and the guide). Merging sketches adds their V; merge sketches
 * built from different seeds, so that their coin flips are independent.
 *
 * @example
 * const s = new QuantileSketch({ k: 200, seed: 7 });
 * s.observeMany(Float64Array.from({ length: 1000 }, (_, i) => i / 1000));
 * [s.quantile(0.5), s.rank(0.25), s.retained]; // [0.499, 0.252, 322]
 */
export class QuantileSketch {
  static readonly kind = "leeway.stats.quantile-sketch";
  static readonly version = 1;

  readonly #k: number;
  readonly #policy: NonFinitePolicy;
  #random: RandomSource;
  #coinBits = 0;
  #coinCount = 0;
  #levels: Float64Array[] = [];
  #sizes: number[] = [];
  #capacities: number[] = [];
  #totalCapacity = 0;
  #retained = 0;
  #count = 0;
  #skipped = 0;
  #min = Infinity;
  #max = -Infinity;
  #errorVariance = 0;
  #scratch = new Float64Array(0);
  // Sorted view for queries, rebuilt lazily after any change.
  #viewValues: Float64Array | null = null;
  #viewCumulative: Float64Array | null = null;

  constructor(options: QuantileSketchOptions) {
    const o = optionsObject<QuantileSketchOptions>("QuantileSketch", options, ["k", "seed", "nonFinite"]);
    this.#k = o.k === undefined ? 200 : integerInRange("QuantileSketch", "k", o.k, MIN_LEVEL_CAPACITY, 65536);
    this.#random = new RandomSource(seedOption("QuantileSketch", "seed", o.seed));
    this.#policy = nonFiniteOption("QuantileSketch", o.nonFinite);
    this.#setLevels(1);
  }

  /** The capacity parameter k. */
  get k(): number {
    return this.#k;
  }

  /** Samples taken. */
  get count(): number {
    return this.#count;
  }

  /** Non-finite samples skipped under `nonFinite: "skip"`. */
  get skipped(): number {
    return this.#skipped;
  }

  /** Items held now (the memory in use, in float64 values). */
  get retained(): number {
    return this.#retained;
  }

  /** Smallest sample (exact); NaN before the first. */
  get min(): number {
    return this.#count === 0 ? Number.NaN : this.#min;
  }

  /** Largest sample (exact); NaN before the first. */
  get max(): number {
    return this.#count === 0 ? Number.NaN : this.#max;
  }

  /** Takes one sample. */
  observe(x: number): QuantileSketchReading {
    if (acceptSample("QuantileSketch", "x", this.#policy, x)) {
      this.#take(x);
    } else {
      this.#skipped++;
    }
    return { count: this.#count, retained: this.#retained, skipped: this.#skipped };
  }

  /** Takes every sample of `xs`; the same state (coin flips included) as `observe` on each. */
  observeMany(xs: Float64Array): void {
    const len = requireBatch("QuantileSketch", xs).length;
    let i = 0;
    while (i < len) {
      // Copy samples into level 0 up to the point where `observe` would compact.
      const room = this.#totalCapacity - this.#retained;
      const end = Math.min(len, i + room);
      let level0 = this.#levels[0] as Float64Array;
      let size = this.#sizes[0] as number;
      if (level0.length < size + (end - i)) level0 = this.#grow(0, size + (end - i));
      let lo = this.#min;
      let hi = this.#max;
      let j = i;
      for (; j < end; j++) {
        const x = (xs[j] as number) + 0; // −0 becomes 0, as it would through JSON
        if (!(x - x === 0)) break; // NaN or ±Infinity
        level0[size++] = x;
        if (x < lo) lo = x;
        if (x > hi) hi = x;
      }
      const taken = j - i;
      if (taken > 0) {
        this.#sizes[0] = size;
        this.#retained += taken;
        this.#count += taken;
        this.#min = lo;
        this.#max = hi;
        this.#viewValues = null;
        if (this.#retained >= this.#totalCapacity) this.#compress();
      }
      if (j < end) {
        this.observe(xs[j] as number);
        j++;
      }
      i = j;
    }
  }

  /**
   * Estimated fraction of the samples ≤ x, in [0, 1]; NaN before the first
   * sample. Off by at most {@link QuantileSketch.rankErrorBound} with
   * probability ≥ 1 − δ.
   */
  rank(x: number): number {
    if (typeof x !== "number" || Number.isNaN(x)) throw new OptionError("QuantileSketch", "x", x, "a number");
    if (this.#count === 0) return Number.NaN;
    let total = 0;
    for (let h = 0; h < this.#levels.length; h++) {
      const items = this.#levels[h] as Float64Array;
      const size = this.#sizes[h] as number;
      let below = 0;
      if (h === 0) {
        for (let i = 0; i < size; i++) if ((items[i] as number) <= x) below++;
      } else {
        below = upperBound(items, size, x);
      }
      total += below * 2 ** h;
    }
    return total / this.#count;
  }

  /**
   * Estimated q-quantile: the smallest retained value whose estimated rank
   * reaches q·n; the exact min at q = 0 and max at q = 1. NaN before the
   * first sample.
   */
  quantile(q: number): number {
    numberInRange("QuantileSketch", "q", q, { min: 0, max: 1 });
    if (this.#count === 0) return Number.NaN;
    if (q === 0) return this.#min;
    if (q === 1) return this.#max;
    const { values, cumulative } = this.#view();
    const target = q * this.#count;
    let lo = 0;
    let hi = values.length - 1;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if ((cumulative[mid] as number) >= target) hi = mid;
      else lo = mid + 1;
    }
    return values[lo] as number;
  }

  /**
   * The normalised rank error that holds for any single query with
   * probability ≥ 1 − δ: √(2·V·ln(2/δ))/n (Azuma–Hoeffding; V = Σ 4^h over
   * the compactions so far). 0 while nothing has been compacted (the sketch
   * is exact then).
   */
  rankErrorBound(delta = 0.01): number {
    numberInRange("QuantileSketch", "delta", delta, { min: 0, max: 1, minExclusive: true, maxExclusive: true });
    if (this.#count === 0) return 0;
    return Math.sqrt(2 * this.#errorVariance * Math.log(2 / delta)) / this.#count;
  }

  /**
   * Folds another sketch (same k) into this one; afterwards this one
   * describes both streams. The other one is not changed.
   */
  merge(other: QuantileSketch): this {
    if (!(other instanceof QuantileSketch)) throw new SampleError("QuantileSketch", "other", other, "a QuantileSketch to merge");
    if (other.#k !== this.#k) throw new StateError("QuantileSketch", `merge needs sketches of the same k; this has k = ${this.#k}, the other k = ${other.#k}`);
    if (other === this) throw new StateError("QuantileSketch", "cannot merge a sketch into itself");
    while (this.#levels.length < other.#levels.length) this.#setLevels(this.#levels.length + 1);
    for (let h = 0; h < other.#levels.length; h++) {
      const add = other.#sizes[h] as number;
      if (add === 0) continue;
      const theirs = other.#levels[h] as Float64Array;
      const size = this.#sizes[h] as number;
      if (h === 0) {
        const mine = (this.#levels[0] as Float64Array).length < size + add ? this.#grow(0, size + add) : (this.#levels[0] as Float64Array);
        mine.set(theirs.subarray(0, add), size);
        this.#sizes[0] = size + add;
      } else {
        this.#mergeInto(h, theirs, add);
      }
    }
    this.#retained += other.#retained;
    this.#count += other.#count;
    this.#skipped += other.#skipped;
    this.#errorVariance += other.#errorVariance;
    if (other.#count > 0) {
      if (other.#min < this.#min) this.#min = other.#min;
      if (other.#max > this.#max) this.#max = other.#max;
    }
    this.#viewValues = null;
    while (this.#retained >= this.#totalCapacity) this.#compress();
    return this;
  }

  /** The whole state (random source included) as JSON-safe data. */
  snapshot(): Snapshot<QuantileSketchState> {
    const empty = this.#count === 0;
    return envelope(QuantileSketch.kind, QuantileSketch.version, {
      k: this.#k,
      nonFinite: this.#policy,
      count: this.#count,
      skipped: this.#skipped,
      min: empty ? null : this.#min,
      max: empty ? null : this.#max,
      errorVariance: this.#errorVariance,
      levels: this.#levels.map((items, h) => ({ items: toPlainArray(items, this.#sizes[h]) })),
      random: this.#random.snapshot(),
      coinBits: this.#coinBits,
      coinCount: this.#coinCount,
    });
  }

  /** Rebuilds a sketch from {@link QuantileSketch.snapshot}; it continues exactly like the original. */
  static restore(snapshot: unknown): QuantileSketch {
    const r = openSnapshot(snapshot, QuantileSketch.kind, QuantileSketch.version);
    const kind = QuantileSketch.kind;
    const k = r.integer("k", MIN_LEVEL_CAPACITY, 65536);
    const policy = r.oneOf("nonFinite", ["refuse", "skip"] as const);
    const count = r.integer("count", 0, Number.MAX_SAFE_INTEGER);
    const skipped = r.integer("skipped", 0, Number.MAX_SAFE_INTEGER);
    const min = r.numberOrNull("min");
    const max = r.numberOrNull("max");
    const errorVariance = r.numberIn("errorVariance", 0, Number.MAX_VALUE);
    const levelReaders = r.objects("levels", { min: 1, max: MAX_LEVELS });
    const capacities = levelCapacities(k, levelReaders.length);
    const totalCapacity = capacities.reduce((a, b) => a + b, 0);
    const levels = levelReaders.map((level) => level.numbers("items", { max: totalCapacity }));
    const random = RandomSource.restore(r.raw("random"));
    const coinCount = r.integer("coinCount", 0, 32);
    const coinBits = r.integer("coinBits", 0, 2 ** 32 - 1);
    if (coinBits >= 2 ** coinCount) throw new SnapshotError(kind, "state.coinBits", `must be below 2^coinCount = ${2 ** coinCount}, got ${coinBits}`);
    const empty = count === 0;
    if (empty !== (min === null) || empty !== (max === null)) throw new SnapshotError(kind, "state.min", "and state.max must be null exactly when no sample was taken");
    let weight = 0;
    let retained = 0;
    levels.forEach((items, h) => {
      retained += items.length;
      weight += items.length * 2 ** h;
      for (let i = 0; i < items.length; i++) {
        const v = items[i] as number;
        if (min === null || max === null || v < min || v > max) throw new SnapshotError(kind, `state.levels[${h}].items[${i}]`, `must lie within [state.min, state.max], got ${v}`);
        if (h > 0 && i > 0 && v < (items[i - 1] as number)) throw new SnapshotError(kind, `state.levels[${h}].items`, "must be sorted ascending above level 0");
      }
    });
    // A compactor above level 0 only comes into being by receiving items, and the top one never gives them all away.
    if (levels.length > 1 && levels[levels.length - 1]?.length === 0) throw new SnapshotError(kind, `state.levels[${levels.length - 1}].items`, "must not be empty: the top compactor always holds items");
    if (weight !== count) throw new SnapshotError(kind, "state.levels", `must hold items of total weight Σ size·2^h = count ${count}, got ${weight}`);
    if (retained >= totalCapacity) throw new SnapshotError(kind, "state.levels", `must hold fewer than ${totalCapacity} items for ${levels.length} levels, got ${retained}`);
    const s = new QuantileSketch({ k, seed: 1, nonFinite: policy });
    s.#random = random;
    s.#coinBits = coinBits;
    s.#coinCount = coinCount;
    s.#setLevels(levels.length);
    levels.forEach((items, h) => {
      const buffer = s.#grow(h, items.length);
      buffer.set(items);
      s.#sizes[h] = items.length;
    });
    s.#retained = retained;
    s.#count = count;
    s.#skipped = skipped;
    s.#min = min ?? Infinity;
    s.#max = max ?? -Infinity;
    s.#errorVariance = errorVariance;
    return s;
  }

  #take(x: number): void {
    x += 0; // −0 becomes 0, as it would through JSON
    let level0 = this.#levels[0] as Float64Array;
    const size = this.#sizes[0] as number;
    if (size >= level0.length) level0 = this.#grow(0, size + 1);
    level0[size] = x;
    this.#sizes[0] = size + 1;
    this.#retained++;
    this.#count++;
    if (x < this.#min) this.#min = x;
    if (x > this.#max) this.#max = x;
    this.#viewValues = null;
    if (this.#retained >= this.#totalCapacity) this.#compress();
  }

  /** Compacts the lowest compactor at or over its capacity (adding a level on top when needed). */
  #compress(): void {
    let h = 0;
    while ((this.#sizes[h] as number) < (this.#capacities[h] as number)) h++;
    if (h === this.#levels.length - 1) this.#setLevels(this.#levels.length + 1);
    const items = this.#levels[h] as Float64Array;
    const size = this.#sizes[h] as number;
    if (h === 0) sortPrefix(items, size);
    const even = size - (size & 1); // an odd item out (the largest) stays at level h
    const offset = this.#coin();
    const half = even >>> 1;
    if (this.#scratch.length < half) this.#scratch = new Float64Array(Math.max(half, 2 * this.#scratch.length));
    const promoted = this.#scratch;
    for (let i = 0; i < half; i++) promoted[i] = items[2 * i + offset] as number;
    if (size & 1) items[0] = items[size - 1] as number;
    this.#sizes[h] = size & 1;
    this.#retained -= half;
    this.#errorVariance += 4 ** h; // each compaction moves any rank by 0 or ±2^h
    this.#mergeInto(h + 1, promoted, half);
  }

  /** One fair coin flip, 0 or 1: the bits of one uniform draw serve 32 compactions. */
  #coin(): number {
    if (this.#coinCount === 0) {
      this.#coinBits = Math.floor(this.#random.next() * 2 ** 32); // the top 32 of its 53 random bits
      this.#coinCount = 32;
    }
    const bit = this.#coinBits % 2;
    this.#coinBits = (this.#coinBits - bit) / 2;
    this.#coinCount--;
    return bit;
  }

  /** Merges `count` sorted values into the sorted compactor h. */
  #mergeInto(h: number, values: Float64Array, count: number): void {
    const size = this.#sizes[h] as number;
    const target = (this.#levels[h] as Float64Array).length < size + count ? this.#grow(h, size + count) : (this.#levels[h] as Float64Array);
    // Merge from the back so it can be done in place.
    let i = size - 1;
    let j = count - 1;
    let out = size + count - 1;
    while (j >= 0) {
      if (i >= 0 && (target[i] as number) > (values[j] as number)) target[out--] = target[i--] as number;
      else target[out--] = values[j--] as number;
    }
    this.#sizes[h] = size + count;
  }

  /** Ensures compactor h can hold `needed` items; returns its buffer. */
  #grow(h: number, needed: number): Float64Array {
    const old = this.#levels[h] as Float64Array;
    if (old.length >= needed) return old;
    const grown = new Float64Array(Math.max(needed, 2 * old.length, 16));
    grown.set(old.subarray(0, this.#sizes[h]));
    this.#levels[h] = grown;
    return grown;
  }

  #setLevels(count: number): void {
    while (this.#levels.length < count) {
      this.#levels.push(new Float64Array(0));
      this.#sizes.push(0);
    }
    this.#capacities = levelCapacities(this.#k, count);
    this.#totalCapacity = this.#capacities.reduce((a, b) => a + b, 0);
  }

  #view(): { values: Float64Array; cumulative: Float64Array } {
    if (this.#viewValues !== null && this.#viewCumulative !== null) return { values: this.#viewValues, cumulative: this.#viewCumulative };
    const n = this.#retained;
    const order = new Float64Array(n);
    const weights = new Float64Array(n);
    let p = 0;
    for (let h = 0; h < this.#levels.length; h++) {
      const items = this.#levels[h] as Float64Array;
      for (let i = 0; i < (this.#sizes[h] as number); i++) {
        order[p] = items[i] as number;
        weights[p++] = 2 ** h;
      }
    }
    const index = Array.from({ length: n }, (_, i) => i).sort((a, b) => (order[a] as number) - (order[b] as number));
    const values = new Float64Array(n);
    const cumulative = new Float64Array(n);
    let sum = 0;
    for (let i = 0; i < n; i++) {
      const at = index[i] as number;
      values[i] = order[at] as number;
      sum += weights[at] as number;
      cumulative[i] = sum;
    }
    this.#viewValues = values;
    this.#viewCumulative = cumulative;
    return { values, cumulative };
  }
}

/** Capacities of H compactors: max(8, ⌈k·(2/3)^(H−1−h)⌉) for h = 0..H−1. */
function levelCapacities(k: number, levels: number): number[] {
  const out: number[] = [];
  for (let h = 0; h < levels; h++) out.push(Math.max(MIN_LEVEL_CAPACITY, Math.ceil(k * (2 / 3) ** (levels - 1 - h))));
  return out;
}

/** Sorts items[0..size) ascending in place: insertion sort for short runs (no allocation), the built-in sort otherwise. */
function sortPrefix(items: Float64Array, size: number): void {
  if (size > 48) {
    items.subarray(0, size).sort();
    return;
  }
  for (let i = 1; i < size; i++) {
    const v = items[i] as number;
    let j = i - 1;
    while (j >= 0 && (items[j] as number) > v) {
      items[j + 1] = items[j] as number;
      j--;
    }
    items[j + 1] = v;
  }
}

/** Number of items ≤ x in the sorted `items[0..size)`. */
function upperBound(items: Float64Array, size: number, x: number): number {
  let lo = 0;
  let hi = size;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if ((items[mid] as number) <= x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}
