import {
  envelope,
  nonFiniteOption,
  NonFiniteError,
  openSnapshot,
  optionsObject,
  positiveInteger,
  SnapshotError,
  toPlainArray,
  MAX_SNAPSHOT_ELEMENTS,
  type NonFinitePolicy,
  type Snapshot,
} from "@leeway/core";

/** Options of {@link WindowMoments}. */
export interface WindowMomentsOptions {
  /** W: the number of most recent samples described (an integer ≥ 1). */
  width: number;
  /** What to do with NaN or ±Infinity samples: `"refuse"` (default) throws, `"skip"` counts them. */
  nonFinite?: NonFinitePolicy;
}

/** What {@link WindowMoments.observe} returns. */
export interface WindowMomentsReading {
  /** Samples taken since the start. */
  count: number;
  /** Samples in the window, min(count, W). */
  size: number;
  mean: number;
  /** Population variance over the window. */
  variance: number;
  min: number;
  max: number;
  skipped: number;
}

/** The plain state inside a {@link WindowMoments} snapshot. */
export interface WindowMomentsState {
  width: number;
  nonFinite: NonFinitePolicy;
  count: number;
  skipped: number;
  /** The samples in the window, oldest first. */
  window: number[];
  /** K, the shift of the running sums. */
  shift: number;
  /** Σ(x − K) over the window. */
  sum: number;
  /** Σ(x − K)² over the window. */
  sumSquares: number;
  /** Samples since K and the sums were last recomputed from the window, in [0, W). */
  sinceRebuild: number;
}

/**
 * Mean, variance, min and max of the last W samples, O(1) amortized per
 * sample and O(W) memory.
 *
 * Method: a ring buffer of the window; shifted running sums
 * S₁ = Σ(x − K), S₂ = Σ(x − K)² updated by adding the new and removing the
 * oldest sample, mean = K + S₁/n, variance = (S₂ − S₁²/n)/n. Every W samples
 * the sums are recomputed from the ring in two passes with K reset to the
 * window mean, so rounding errors cannot accumulate past one window (no drift
 * over 10⁷ samples) and the shift stays near the data; after a level jump
 * (the window mean more than one standard deviation from K) the recomputation
 * comes early, at most once per W/4 samples. Error: the variance is off by at
 * most about W·ε·R² (ε = 2⁻⁵³, R the range of the last 2W samples), usually
 * far less. Min and max come from
 * monotone deques (the sliding-window minimum of Lemire, 2006): each sample
 * enters and leaves each deque at most once.
 *
 * @example
 * const w = new WindowMoments({ width: 3 });
 * w.observeMany(Float64Array.from([9, 1, 2, 3]));
 * [w.mean, w.min, w.max, w.size]; // [2, 1, 3, 3]
 */
export class WindowMoments {
  static readonly kind = "leeway.stats.window-moments";
  static readonly version = 1;

  readonly #width: number;
  readonly #policy: NonFinitePolicy;
  readonly #ring: Float64Array;
  #head = 0; // where the next sample goes (the oldest sample once full)
  #size = 0;
  #count = 0;
  #skipped = 0;
  #shift = 0; // K
  #sum = 0; // S₁ = Σ(x − K)
  #sumSq = 0; // S₂ = Σ(x − K)²
  #sinceRebuild = 0; // samples since K, S₁, S₂ were last recomputed
  readonly #earliestRebuild: number; // an early recomputation waits at least W/4 samples, keeping O(1) amortized
  // Monotone deques as rings of capacity W: values and absolute sample indices.
  readonly #maxVal: Float64Array;
  readonly #maxIdx: Float64Array;
  #maxHead = 0;
  #maxLen = 0;
  readonly #minVal: Float64Array;
  readonly #minIdx: Float64Array;
  #minHead = 0;
  #minLen = 0;

  constructor(options: WindowMomentsOptions) {
    const o = optionsObject<WindowMomentsOptions>("WindowMoments", options, ["width", "nonFinite"]);
    this.#width = positiveInteger("WindowMoments", "width", o.width, MAX_SNAPSHOT_ELEMENTS);
    this.#policy = nonFiniteOption("WindowMoments", o.nonFinite);
    this.#ring = new Float64Array(this.#width);
    this.#earliestRebuild = Math.ceil(this.#width / 4);
    this.#maxVal = new Float64Array(this.#width);
    this.#maxIdx = new Float64Array(this.#width);
    this.#minVal = new Float64Array(this.#width);
    this.#minIdx = new Float64Array(this.#width);
  }

  /** W, the window width. */
  get width(): number {
    return this.#width;
  }

  /** Samples taken since the start (skipped ones excluded). */
  get count(): number {
    return this.#count;
  }

  /** Samples in the window, min(count, W). */
  get size(): number {
    return this.#size;
  }

  /** Non-finite samples skipped under `nonFinite: "skip"`. */
  get skipped(): number {
    return this.#skipped;
  }

  /** Mean of the window; NaN while it is empty. */
  get mean(): number {
    return this.#size === 0 ? Number.NaN : this.#shift + this.#sum / this.#size;
  }

  /** Population variance of the window; NaN while it is empty. */
  get variance(): number {
    const n = this.#size;
    if (n === 0) return Number.NaN;
    return Math.max(0, (this.#sumSq - (this.#sum * this.#sum) / n) / n);
  }

  /** Sample variance of the window (divisor n − 1); NaN below two samples. */
  get sampleVariance(): number {
    const n = this.#size;
    return n < 2 ? Number.NaN : (this.variance * n) / (n - 1);
  }

  /** √variance. */
  get std(): number {
    return Math.sqrt(this.variance);
  }

  /** Smallest sample in the window; NaN while it is empty. */
  get min(): number {
    return this.#minLen === 0 ? Number.NaN : (this.#minVal[this.#minHead] as number);
  }

  /** Largest sample in the window; NaN while it is empty. */
  get max(): number {
    return this.#maxLen === 0 ? Number.NaN : (this.#maxVal[this.#maxHead] as number);
  }

  /** Takes one sample; returns the window's moments. */
  observe(x: number): WindowMomentsReading {
    if (!Number.isFinite(x)) {
      if (this.#policy === "refuse") throw new NonFiniteError("WindowMoments", "x", x);
      this.#skipped++;
    } else {
      this.#push(x);
    }
    return { count: this.#count, size: this.#size, mean: this.mean, variance: this.variance, min: this.min, max: this.max, skipped: this.#skipped };
  }

  /** Takes every sample of `xs`; the same state as `observe` on each. */
  observeMany(xs: Float64Array): void {
    for (let i = 0; i < xs.length; i++) {
      const x = xs[i] as number;
      if (Number.isFinite(x)) this.#push(x);
      else this.observe(x);
    }
  }

  /** The samples in the window, oldest first (a copy). */
  values(): Float64Array {
    const out = new Float64Array(this.#size);
    const start = this.#size === this.#width ? this.#head : 0;
    for (let i = 0; i < this.#size; i++) {
      let p = start + i;
      if (p >= this.#width) p -= this.#width;
      out[i] = this.#ring[p] as number;
    }
    return out;
  }

  /** The whole state as JSON-safe data. */
  snapshot(): Snapshot<WindowMomentsState> {
    return envelope(WindowMoments.kind, WindowMoments.version, {
      width: this.#width,
      nonFinite: this.#policy,
      count: this.#count,
      skipped: this.#skipped,
      window: toPlainArray(this.values()),
      shift: this.#shift,
      sum: this.#sum,
      sumSquares: this.#sumSq,
      sinceRebuild: this.#sinceRebuild,
    });
  }

  /** Rebuilds a window from {@link WindowMoments.snapshot}; it continues exactly like the original. */
  static restore(snapshot: unknown): WindowMoments {
    const r = openSnapshot(snapshot, WindowMoments.kind, WindowMoments.version);
    const width = r.integer("width", 1, MAX_SNAPSHOT_ELEMENTS);
    const policy = r.oneOf("nonFinite", ["refuse", "skip"] as const);
    const count = r.integer("count", 0, Number.MAX_SAFE_INTEGER);
    const skipped = r.integer("skipped", 0, Number.MAX_SAFE_INTEGER);
    const size = Math.min(count, width);
    const window = r.numbers("window", size);
    const shift = r.number("shift");
    const sum = r.number("sum");
    const sumSq = r.numberIn("sumSquares", 0, Number.MAX_VALUE);
    const sinceRebuild = r.integer("sinceRebuild", 0, Math.min(width - 1, count));
    if (size === 0 && (shift !== 0 || sum !== 0 || sumSq !== 0)) {
      throw new SnapshotError(WindowMoments.kind, "state.sum", "and state.shift, state.sumSquares must be 0 for an empty window");
    }
    const w = new WindowMoments({ width, nonFinite: policy });
    // Replaying the window rebuilds the ring and the deques exactly (they depend only on the window's contents).
    const first = count - size;
    for (let i = 0; i < size; i++) w.#enter(window[i] as number, first + i);
    w.#size = size;
    w.#head = size === width ? 0 : size;
    w.#count = count;
    w.#skipped = skipped;
    w.#shift = shift;
    w.#sum = sum;
    w.#sumSq = sumSq;
    w.#sinceRebuild = sinceRebuild;
    return w;
  }

  #push(x: number): void {
    x += 0; // −0 becomes 0, as it would through JSON
    const n = this.#size;
    const k = this.#shift;
    if (this.#count === 0) {
      this.#shift = x;
      this.#sum = 0;
      this.#sumSq = 0;
      this.#enter(x, 0);
      this.#size = 1;
    } else {
      const d = x - k; // d = x − K
      if (n === this.#width) {
        const e = (this.#ring[this.#head] as number) - k; // the oldest sample, leaving
        this.#sum += d - e;
        this.#sumSq += d * d - e * e;
      } else {
        this.#sum += d;
        this.#sumSq += d * d;
        this.#size = n + 1;
      }
      this.#enter(x, this.#count);
    }
    this.#count++;
    const since = ++this.#sinceRebuild;
    if (since === this.#width) this.#rebuild();
    else if (since >= this.#earliestRebuild && this.#shiftIsStale()) this.#rebuild();
  }

  /**
   * True when the window mean has moved more than one standard deviation away
   * from K (then S₂ − S₁²/n would cancel more than one bit): (S₁/n)² > S₂/n − (S₁/n)²,
   * i.e. S₁² > n·S₂/2, and the offset is more than rounding of K itself.
   */
  #shiftIsStale(): boolean {
    const n = this.#size;
    const s1 = this.#sum;
    return s1 * s1 > 0.5 * n * this.#sumSq && Math.abs(s1) > n * 2 ** -40 * Math.abs(this.#shift);
  }

  /** Writes x into the ring and both deques as sample number `index`. */
  #enter(x: number, index: number): void {
    const width = this.#width;
    this.#ring[this.#head] = x;
    this.#head = this.#head + 1 === width ? 0 : this.#head + 1;
    const expired = index - width; // indices ≤ this have left the window
    // Max deque: values strictly decreasing from the front.
    let len = this.#maxLen;
    let head = this.#maxHead;
    while (len > 0) {
      let back = head + len - 1;
      if (back >= width) back -= width;
      if ((this.#maxVal[back] as number) > x) break;
      len--;
    }
    if (len > 0 && (this.#maxIdx[head] as number) <= expired) {
      head = head + 1 === width ? 0 : head + 1;
      len--;
    }
    let slot = head + len;
    if (slot >= width) slot -= width;
    this.#maxVal[slot] = x;
    this.#maxIdx[slot] = index;
    this.#maxHead = head;
    this.#maxLen = len + 1;
    // Min deque: values strictly increasing from the front.
    len = this.#minLen;
    head = this.#minHead;
    while (len > 0) {
      let back = head + len - 1;
      if (back >= width) back -= width;
      if ((this.#minVal[back] as number) < x) break;
      len--;
    }
    if (len > 0 && (this.#minIdx[head] as number) <= expired) {
      head = head + 1 === width ? 0 : head + 1;
      len--;
    }
    slot = head + len;
    if (slot >= width) slot -= width;
    this.#minVal[slot] = x;
    this.#minIdx[slot] = index;
    this.#minHead = head;
    this.#minLen = len + 1;
  }

  /**
   * Recomputes K, S₁ and S₂ from the ring (two passes, oldest sample first so
   * that a restored ring sums in the same order), ending any drift of the
   * running sums.
   */
  #rebuild(): void {
    this.#sinceRebuild = 0;
    const n = this.#size;
    const ring = this.#ring;
    const start = n === this.#width ? this.#head : 0;
    let total = 0;
    for (let i = start; i < n; i++) total += ring[i] as number;
    for (let i = 0; i < start; i++) total += ring[i] as number;
    const k = total / n;
    let s1 = 0;
    let s2 = 0;
    for (let i = start; i < n; i++) {
      const d = (ring[i] as number) - k;
      s1 += d;
      s2 += d * d;
    }
    for (let i = 0; i < start; i++) {
      const d = (ring[i] as number) - k;
      s1 += d;
      s2 += d * d;
    }
    this.#shift = k;
    this.#sum = s1;
    this.#sumSq = s2;
  }
}
