import { acceptSample, MAX_SAMPLE_MAGNITUDE, requireBatch } from "./samples.js";
import {
  booleanOption,
  DimensionError,
  envelope,
  nonFiniteOption,
  NonFiniteError,
  openSnapshot,
  SampleError,
  OptionError,
  optionsObject,
  SnapshotError,
  type NonFinitePolicy,
  type Snapshot,
} from "@leeway/core";


// Module-local copies: hot loops read them as plain bindings, whatever the module loader does with imports.
const SAMPLE_LIMIT = MAX_SAMPLE_MAGNITUDE;
const accept = acceptSample;
/** Options of {@link Moments}. */
export interface MomentsOptions {
  /** Accept a weight per sample (frequency weights, each > 0). Default false: every weight is 1. */
  weighted?: boolean;
  /** What to do with NaN, ±Infinity or |x| > 1e100 samples (and non-finite weights or weights > 1e50): `"refuse"` (default) throws, `"skip"` counts them. */
  nonFinite?: NonFinitePolicy;
}

/** What {@link Moments.observe} returns. */
export interface MomentsReading {
  /** Samples taken so far. */
  count: number;
  /** Weighted mean of the samples (NaN before the first). */
  mean: number;
  /** Population variance M₂/W (NaN before the first sample). */
  variance: number;
  /** Non-finite samples skipped under `nonFinite: "skip"`. */
  skipped: number;
}

/** The plain state inside a {@link Moments} snapshot. */
export interface MomentsState {
  weighted: boolean;
  nonFinite: NonFinitePolicy;
  /** The part already merged: count, weight W, mean x̄ and M₂ = Σw(x − x̄)². */
  merged: { count: number; weight: number; mean: number; m2: number };
  /** The open block: count, weight, shift K, Σw(x − K), Σw(x − K)². */
  block: { count: number; weight: number; shift: number; sum: number; sumSquares: number };
  min: number | null;
  max: number | null;
  skipped: number;
}

/** The largest weight taken: w·(x − K)² stays far from overflow for |x| ≤ 1e100. */
export const MAX_WEIGHT = 1e50;

/** The non-finite policy for a weight (the sample itself passed). */
function acceptWeight(policy: NonFinitePolicy, w: number): boolean {
  if (w <= MAX_WEIGHT) return true;
  if (Number.isFinite(w)) throw new SampleError("Moments", "weight", w, `a finite number in (0, ${MAX_WEIGHT}]`);
  if (policy === "refuse") throw new NonFiniteError("Moments", "weight", w);
  return false;
}

/** Samples per shifted block before it is merged into the running moments. */
export const MOMENTS_BLOCK = 256;

/**
 * Count, mean, variance, min and max of a score stream in O(1) memory,
 * optionally weighted, mergeable across streams or processes.
 *
 * Method: samples accumulate into a block of up to 256 shifted sums
 * S₁ = Σw(x − K), S₂ = Σw(x − K)², with the shift K the running mean when the
 * block opens (so S₂ − S₁²/W_b loses no digits); each full block is folded
 * into the running (W, x̄, M₂) by the pairwise formula of Chan, Golub &
 * LeVeque (1979): with δ = x̄_B − x̄_A and W = W_A + W_B,
 * x̄ = x̄_A + δ·W_B/W and M₂ = M₂,A + M₂,B + δ²·W_A·W_B/W.
 * `observe` and `observeMany` run the same arithmetic, so they reach the same
 * state bit for bit, and the batch loop carries no division.
 *
 * @example
 * const m = new Moments();
 * m.observeMany(Float64Array.from([2, 4, 4, 4, 5, 5, 7, 9]));
 * [m.mean, m.std, m.sampleVariance.toFixed(4)]; // [5, 2, "4.5714"]
 */
export class Moments {
  static readonly kind = "leeway.stats.moments";
  static readonly version = 1;

  readonly #weighted: boolean;
  readonly #policy: NonFinitePolicy;
  // Merged part: count n, weight W, mean x̄, M₂ = Σw(x − x̄)².
  #n = 0;
  #w = 0;
  #mean = 0;
  #m2 = 0;
  // Open block: count, weight, shift K, S₁ = Σw(x − K), S₂ = Σw(x − K)².
  #bCount = 0;
  #bWeight = 0;
  #bShift = 0;
  #bSum = 0;
  #bSq = 0;
  #min = Infinity;
  #max = -Infinity;
  #skipped = 0;
  readonly #out = new Float64Array(3); // mean, M₂ and M₂/W of the whole, from #summarise

  constructor(options?: MomentsOptions) {
    const o = optionsObject<MomentsOptions>("Moments", options, ["weighted", "nonFinite"]);
    this.#weighted = o.weighted === undefined ? false : booleanOption("Moments", "weighted", o.weighted);
    this.#policy = nonFiniteOption("Moments", o.nonFinite);
  }

  /** Whether per-sample weights are accepted. */
  get weighted(): boolean {
    return this.#weighted;
  }

  /** Samples taken (skipped ones excluded). */
  get count(): number {
    return this.#n + this.#bCount;
  }

  /** Sum of the weights W (equals `count` when unweighted). */
  get weight(): number {
    return this.#w + this.#bWeight;
  }

  /** Weighted mean x̄; NaN before the first sample. */
  get mean(): number {
    if (this.#n + this.#bCount === 0) return Number.NaN;
    this.#summarise();
    return this.#out[0] as number;
  }

  /** M₂ = Σw(x − x̄)², the sum of squared deviations. */
  get sumSquaredDeviations(): number {
    this.#summarise();
    return this.#out[1] as number;
  }

  /** Population variance M₂/W; NaN before the first sample. */
  get variance(): number {
    if (this.#n + this.#bCount === 0) return Number.NaN;
    this.#summarise();
    return this.#out[2] as number;
  }

  /** Sample variance M₂/(W − 1) (frequency weights); NaN while W ≤ 1. */
  get sampleVariance(): number {
    const w = this.weight;
    return w > 1 ? this.sumSquaredDeviations / (w - 1) : Number.NaN;
  }

  /** Population standard deviation √(M₂/W). */
  get std(): number {
    return Math.sqrt(this.variance);
  }

  /** Sample standard deviation √(M₂/(W − 1)). */
  get sampleStd(): number {
    return Math.sqrt(this.sampleVariance);
  }

  /** Smallest sample; NaN before the first. */
  get min(): number {
    return this.count === 0 ? Number.NaN : this.#min;
  }

  /** Largest sample; NaN before the first. */
  get max(): number {
    return this.count === 0 ? Number.NaN : this.#max;
  }

  /** Non-finite samples skipped under `nonFinite: "skip"`. */
  get skipped(): number {
    return this.#skipped;
  }

  /**
   * Takes one sample (and its weight, only when `weighted`) and returns the
   * count, mean and population variance so far.
   */
  observe(x: number, weight?: number): MomentsReading {
    // The common case (finite, unweighted) stays small enough to inline; the rest goes the long way.
    if (weight === undefined && typeof x === "number" && Math.abs(x) <= SAMPLE_LIMIT) this.#take(x, 1);
    else this.#takeChecked(x, weight);
    const count = this.#n + this.#bCount;
    if (count === 0) return { count, mean: Number.NaN, variance: Number.NaN, skipped: this.#skipped };
    this.#summarise();
    return { count, mean: this.#out[0] as number, variance: this.#out[2] as number, skipped: this.#skipped };
  }

  /** Validates the weight, applies the non-finite policy, then takes the sample. */
  #takeChecked(x: number, weight: number | undefined): void {
    const w = this.#checkWeight(weight);
    if (accept("Moments", "x", this.#policy, x, SAMPLE_LIMIT) && acceptWeight(this.#policy, w)) this.#take(x, w);
    else this.#skipped++;
  }

  /**
   * Takes every sample of `xs` (with `weights[i]` when `weighted`); reaches
   * the same state as `observe` on each element, bit for bit.
   */
  observeMany(xs: Float64Array, weights?: Float64Array): void {
    requireBatch("Moments", xs);
    if (weights !== undefined) {
      requireBatch("Moments", weights, "weights");
      if (!this.#weighted) throw new OptionError("Moments", "weights", weights, "omitted unless the option weighted is true");
      if (weights.length !== xs.length) throw new DimensionError("Moments", "weights", xs.length, weights.length);
      for (let i = 0; i < xs.length; i++) this.observe(xs[i] as number, weights[i] as number);
      return;
    }
    const len = xs.length;
    let i = 0;
    while (i < len) {
      if (this.#bCount === 0) {
        // The first sample of a block fixes its shift K; take it one by one, as `observe` would.
        const first = xs[i] as number;
        if (Math.abs(first) <= SAMPLE_LIMIT) this.#take(first, 1);
        else this.observe(first);
        i++;
        continue;
      }
      const start = i;
      const shift = this.#bShift;
      let s1 = this.#bSum;
      let s2 = this.#bSq;
      let lo = this.#min;
      let hi = this.#max;
      const left = MOMENTS_BLOCK - this.#bCount; // samples until this block is full
      const end = len - i < left ? len : i + left;
      for (; i < end; i++) {
        const x = xs[i] as number;
        const d = x - shift; // d = x − K
        s1 += d;
        s2 += d * d;
        if (x < lo) lo = x;
        if (x > hi) hi = x;
      }
      if (!(Number.isFinite(s1) && Number.isFinite(s2) && lo >= -SAMPLE_LIMIT && hi <= SAMPLE_LIMIT)) {
        // A non-finite or too large sample in this run: redo it one by one,
        // which refuses or skips exactly where `observe` would.
        for (let j = start; j < i; j++) this.observe(xs[j] as number);
        continue;
      }
      this.#bSum = s1;
      this.#bSq = s2;
      this.#bCount += i - start;
      this.#bWeight += i - start;
      this.#min = lo + 0; // + 0 turns −0 into 0, as JSON would
      this.#max = hi + 0;
      if (this.#bCount === MOMENTS_BLOCK) this.#flush();
    }
  }

  /**
   * Folds another accumulator into this one by the Chan–Golub–LeVeque
   * pairwise formula; afterwards this one describes both streams. The other
   * one is not changed.
   */
  merge(other: Moments): this {
    if (!(other instanceof Moments)) throw new SampleError("Moments", "other", other, "a Moments to merge");
    this.#flush();
    const n = other.count;
    if (n === 0) {
      this.#skipped += other.#skipped;
      return this;
    }
    const w = other.weight;
    const mean = other.mean;
    const m2 = other.sumSquaredDeviations;
    this.#combine(n, w, mean, m2);
    if (other.#min < this.#min) this.#min = other.#min;
    if (other.#max > this.#max) this.#max = other.#max;
    this.#skipped += other.#skipped;
    return this;
  }

  /** The whole state as JSON-safe data. */
  snapshot(): Snapshot<MomentsState> {
    const empty = this.count === 0;
    return envelope(Moments.kind, Moments.version, {
      weighted: this.#weighted,
      nonFinite: this.#policy,
      merged: { count: this.#n, weight: this.#w, mean: this.#mean, m2: this.#m2 },
      block: { count: this.#bCount, weight: this.#bWeight, shift: this.#bShift, sum: this.#bSum, sumSquares: this.#bSq },
      min: empty ? null : this.#min,
      max: empty ? null : this.#max,
      skipped: this.#skipped,
    });
  }

  /** Rebuilds an accumulator from {@link Moments.snapshot}; it continues exactly like the original. */
  static restore(snapshot: unknown): Moments {
    const r = openSnapshot(snapshot, Moments.kind, Moments.version);
    const weighted = r.boolean("weighted");
    const policy = r.oneOf("nonFinite", ["refuse", "skip"] as const);
    const merged = r.object("merged");
    const n = merged.integer("count", 0, Number.MAX_SAFE_INTEGER);
    const w = merged.numberIn("weight", 0, Number.MAX_VALUE);
    const mean = merged.number("mean");
    const m2 = merged.numberIn("m2", 0, Number.MAX_VALUE);
    const block = r.object("block");
    const bCount = block.integer("count", 0, MOMENTS_BLOCK - 1);
    const bWeight = block.numberIn("weight", 0, Number.MAX_VALUE);
    const bShift = block.number("shift");
    const bSum = block.number("sum");
    const bSq = block.numberIn("sumSquares", 0, Number.MAX_VALUE);
    const min = r.numberOrNull("min");
    const max = r.numberOrNull("max");
    const skipped = r.integer("skipped", 0, Number.MAX_SAFE_INTEGER);
    const kind = Moments.kind;
    if ((n === 0) !== (w === 0)) throw new SnapshotError(kind, "state.merged.weight", `must be 0 exactly when the count is 0, got ${w} for count ${n}`);
    if ((bCount === 0) !== (bWeight === 0)) throw new SnapshotError(kind, "state.block.weight", `must be 0 exactly when the count is 0, got ${bWeight} for count ${bCount}`);
    if (!weighted && w !== n) throw new SnapshotError(kind, "state.merged.weight", `must equal the count ${n} when unweighted, got ${w}`);
    if (!weighted && bWeight !== bCount) throw new SnapshotError(kind, "state.block.weight", `must equal the count ${bCount} when unweighted, got ${bWeight}`);
    const empty = n + bCount === 0;
    if (empty !== (min === null) || empty !== (max === null)) throw new SnapshotError(kind, "state.min", "and state.max must be null exactly when no sample was taken");
    if (min !== null && max !== null && min > max) throw new SnapshotError(kind, "state.min", `must not exceed state.max, got ${min} > ${max}`);
    // Samples lie in ±L, so do means, shifts and extremes; a weighted sum of squared deviations
    // from a point in ±L is at most (2L)² times its weight (bounds with slack for rounding).
    const L = SAMPLE_LIMIT;
    const within = (reader: typeof r, name: string, value: number, limit: number): void => {
      if (!(Math.abs(value) <= limit)) reader.fail(name, `must be within ±${limit}, what samples within ±${L} can give, got ${value}`);
    };
    within(merged, "mean", mean, L);
    within(merged, "m2", m2, 5 * L * L * w);
    within(block, "shift", bShift, L);
    within(block, "sum", bSum, 3 * L * bWeight);
    within(block, "sumSquares", bSq, 5 * L * L * bWeight);
    within(r, "min", min ?? 0, L);
    within(r, "max", max ?? 0, L);
    const m = new Moments({ weighted, nonFinite: policy });
    m.#n = n;
    m.#w = w;
    m.#mean = mean;
    m.#m2 = m2;
    m.#bCount = bCount;
    m.#bWeight = bWeight;
    m.#bShift = bShift;
    m.#bSum = bSum;
    m.#bSq = bSq;
    m.#min = min ?? Infinity;
    m.#max = max ?? -Infinity;
    m.#skipped = skipped;
    return m;
  }

  /**
   * Writes the mean and M₂ of merged part + open block into #out, by the
   * same Chan–Golub–LeVeque step a flush would take (so readings before and
   * after a flush agree to rounding).
   */
  #summarise(): void {
    const out = this.#out;
    if (this.#bCount === 0) {
      out[0] = this.#mean;
      out[1] = this.#m2;
      out[2] = this.#m2 / this.#w;
      return;
    }
    const bw = this.#bWeight;
    const t = this.#bSum / bw; // block mean − K
    const bM2 = Math.max(0, this.#bSq - this.#bSum * t); // S₂ − S₁²/W_B
    if (this.#n === 0) {
      out[0] = this.#bShift + t;
      out[1] = bM2;
      out[2] = bM2 / bw;
      return;
    }
    const inverse = 1 / (this.#w + bw); // 1/W, computed beside t rather than after it
    const f = bw * inverse; // W_B/W
    const delta = this.#bShift + t - this.#mean; // δ = x̄_B − x̄_A
    const m2 = this.#m2 + bM2 + delta * delta * (this.#w * f); // + δ²·W_A·W_B/W
    out[0] = this.#mean + delta * f;
    out[1] = m2;
    out[2] = m2 * inverse; // M₂/W
  }

  #checkWeight(weight: number | undefined): number {
    if (weight === undefined) return 1;
    if (!this.#weighted) throw new OptionError("Moments", "weight", weight, "omitted unless the option weighted is true");
    if (typeof weight !== "number") throw new SampleError("Moments", "weight", weight, "a number");
    if (weight <= 0) throw new OptionError("Moments", "weight", weight, "a finite number > 0");
    return weight;
  }

  #take(x: number, w: number): void {
    // K: the running mean, or the first sample (+ 0 turns −0 into 0, as JSON would).
    if (this.#bCount === 0) this.#bShift = this.#n > 0 ? this.#mean : x + 0;
    const d = x - this.#bShift; // d = x − K
    const wd = w * d;
    this.#bSum += wd;
    this.#bSq += wd * d;
    this.#bCount++;
    this.#bWeight += w;
    if (x < this.#min) this.#min = x + 0;
    if (x > this.#max) this.#max = x + 0;
    if (this.#bCount === MOMENTS_BLOCK) this.#flush();
  }

  /** Folds the open block into the merged part (Chan–Golub–LeVeque). */
  #flush(): void {
    if (this.#bCount === 0) return;
    const bw = this.#bWeight;
    const t = this.#bSum / bw;
    const bMean = this.#bShift + t;
    const bM2 = Math.max(0, this.#bSq - this.#bSum * t);
    const count = this.#bCount;
    this.#bCount = 0;
    this.#bWeight = 0;
    this.#bSum = 0;
    this.#bSq = 0;
    this.#bShift = 0;
    this.#combine(count, bw, bMean, bM2);
  }

  #combine(count: number, wB: number, meanB: number, m2B: number): void {
    if (this.#n === 0) {
      this.#n = count;
      this.#w = wB;
      this.#mean = meanB;
      this.#m2 = m2B;
      return;
    }
    const wA = this.#w;
    const total = wA + wB;
    const f = wB / total; // W_B/W
    const delta = meanB - this.#mean; // δ = x̄_B − x̄_A
    this.#mean += delta * f;
    this.#m2 += m2B + delta * delta * (wA * f); // + δ²·W_A·W_B/W
    this.#n += count;
    this.#w = total;
  }
}
