import { acceptSample, MAX_SAMPLE_MAGNITUDE, requireBatch, runBatch } from "./samples.js";
import {
  envelope,
  nonFiniteOption,
  openSnapshot,
  optionsObject,
  positiveInteger,
  SnapshotError,
  toPlainArray,
  MAX_SNAPSHOT_ELEMENTS,
  type NonFinitePolicy,
  type Snapshot,
} from "@leeway/core";


// Module-local copies: hot loops read them as plain bindings, whatever the module loader does with imports.
const SAMPLE_LIMIT = MAX_SAMPLE_MAGNITUDE;
const accept = acceptSample;
/**
 * After looking at the shift with `since` samples since the last
 * recomputation, the next such count to look at: every 8th from W/4 on.
 */
function nextCheck(since: number, earliest: number): number {
  const first = since + 1 > earliest ? since + 1 : earliest;
  return ((first + 7) >> 3) << 3; // ⌈first/8⌉·8 in integer steps (first < 2³¹)
}

/** Options of {@link WindowMoments}. */
export interface WindowMomentsOptions {
  /** W: the number of most recent samples described (an integer ≥ 1). */
  width: number;
  /** What to do with NaN, ±Infinity or |x| > 1e100 (whose squares could overflow): `"refuse"` (default) throws, `"skip"` counts them. */
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
  /** Samples since K or the sums were last recomputed from the window, in [0, W]. */
  sinceRebuild: number;
}

/**
 * Mean, variance, min and max of the last W samples, O(1) amortized per
 * sample and O(W) memory.
 *
 * Method: a ring buffer of the window; shifted running sums
 * S₁ = Σ(x − K), S₂ = Σ(x − K)² updated by adding the new and removing the
 * oldest sample, mean = K + S₁/n, variance = (S₂ − S₁²/n)/n. Each time a
 * block of W samples completes, the sums are recomputed from the ring (in
 * the same pass as the suffix extrema below), so rounding errors cannot
 * accumulate past one window (no drift over 10⁷ samples); whenever the window
 * mean has moved more than one standard deviation from K (after a level
 * jump, say), K is reset to the window mean and the sums recomputed around
 * it, looked at after each block and every 8th sample from W/4 samples after
 * a recomputation. Error: the variance is off by at most about W·ε·R²
 * (ε = 2⁻⁵³, R the range of the last 2W samples), usually far less. Min and
 * max are exact, by the van Herk (1992) / Gil & Werman (1993) block scheme:
 * the running extrema of the current block of W samples and the suffix
 * extrema of the previous one, recomputed once per block
 * (about four comparisons per sample, no unpredictable branches).
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
  readonly #earliestRebuild: number;
  readonly #one = new Float64Array(1); // observe(x) runs the batch loop on [x] // an early recomputation waits at least W/4 samples, keeping O(1) amortized
  // Sliding min and max (van Herk, 1992; Gil & Werman, 1993): the ring position of sample t is t mod W, so
  // the stream falls into blocks of W. Per block we keep the running (prefix) min and max; when a block
  // completes, the suffix minima and maxima of it; the window's min is min(suffix of the previous block
  // past the newest position, prefix of the current block).
  readonly #sufMin: Float64Array;
  readonly #sufMax: Float64Array;
  #preMin = 0;
  #preMax = 0;

  constructor(options: WindowMomentsOptions) {
    const o = optionsObject<WindowMomentsOptions>("WindowMoments", options, ["width", "nonFinite"]);
    this.#width = positiveInteger("WindowMoments", "width", o.width, MAX_SNAPSHOT_ELEMENTS);
    this.#policy = nonFiniteOption("WindowMoments", o.nonFinite);
    this.#ring = new Float64Array(this.#width);
    this.#earliestRebuild = Math.ceil(this.#width / 4);
    this.#sufMin = new Float64Array(this.#width);
    this.#sufMax = new Float64Array(this.#width);
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
    const after = this.#suffixStart();
    if (after < 0) return this.#count === 0 ? Number.NaN : this.#preMin;
    const s = this.#sufMin[after] as number;
    return s < this.#preMin ? s : this.#preMin;
  }

  /** Largest sample in the window; NaN while it is empty. */
  get max(): number {
    const after = this.#suffixStart();
    if (after < 0) return this.#count === 0 ? Number.NaN : this.#preMax;
    const s = this.#sufMax[after] as number;
    return s > this.#preMax ? s : this.#preMax;
  }

  /** Ring position where the previous block's part of the window starts, or −1 when the window lies in the current block. */
  #suffixStart(): number {
    if (this.#count <= this.#width) return -1;
    // The newest sample sits just before head; the window's older part is the previous block from head on.
    return this.#head === 0 ? -1 : this.#head;
  }

  /** Takes one sample; returns the window's moments. */
  observe(x: number): WindowMomentsReading {
    if (accept("WindowMoments", "x", this.#policy, x, SAMPLE_LIMIT)) {
      this.#one[0] = x;
      this.#run(this.#one);
    } else {
      this.#skipped++;
    }
    return { count: this.#count, size: this.#size, mean: this.mean, variance: this.variance, min: this.min, max: this.max, skipped: this.#skipped };
  }

  /** Takes every sample of `xs`; the same state as `observe` on each, bit for bit (both run the same loop). */
  observeMany(xs: Float64Array): void {
    runBatch(
      requireBatch("WindowMoments", xs),
      (rest) => this.#run(rest),
      (x) => this.observe(x),
    );
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
    // samples lie in ±L, so does the shift; sums over the window of (x − shift) and its square are bounded by it (slack for rounding)
    const L = SAMPLE_LIMIT;
    for (let i = 0; i < size; i++) if (!(Math.abs(window[i] as number) <= L)) r.fail(`window[${i}]`, `must be a sample within ±${L}, got ${window[i]}`);
    const shift = r.numberIn("shift", -L, L);
    const sum = r.numberIn("sum", -3 * L * size, 3 * L * size);
    const sumSq = r.numberIn("sumSquares", 0, 5 * L * L * size);
    const sinceRebuild = r.integer("sinceRebuild", 0, Math.min(width, count));
    if (size === 0 && (shift !== 0 || sum !== 0 || sumSq !== 0)) {
      throw new SnapshotError(WindowMoments.kind, "state.sum", "and state.shift, state.sumSquares must be 0 for an empty window");
    }
    const w = new WindowMoments({ width, nonFinite: policy });
    // Sample t lives at ring position t mod W; then the running and suffix extrema follow from the ring.
    const first = count - size;
    for (let i = 0; i < size; i++) w.#ring[(first + i) % width] = window[i] as number;
    w.#head = count % width;
    w.#size = size;
    w.#restoreExtrema(count);
    w.#count = count;
    w.#skipped = skipped;
    w.#shift = shift;
    w.#sum = sum;
    w.#sumSq = sumSq;
    w.#sinceRebuild = sinceRebuild;
    return w;
  }

  /**
   * Takes xs[0], xs[1], ... up to the first non-finite sample and returns its
   * index (xs.length when all are finite). The one loop behind `observe` and
   * `observeMany`, with the state in locals.
   */
  #run(xs: Float64Array): number {
    const width = this.#width;
    const ring = this.#ring;
    const sufMin = this.#sufMin;
    const sufMax = this.#sufMax;
    const earliest = this.#earliestRebuild;
    let head = this.#head;
    let size = this.#size;
    let count = this.#count;
    let since = this.#sinceRebuild;
    let check = nextCheck(since - 1, earliest); // the next value of `since` at which to look at the shift
    let k = this.#shift; // K
    let s1 = this.#sum; // S₁ = Σ(x − K)
    let s2 = this.#sumSq; // S₂ = Σ(x − K)²
    let preMin = this.#preMin;
    let preMax = this.#preMax;
    let i = 0;
    for (; i < xs.length; i++) {
      const x = (xs[i] as number) + 0; // + 0 turns −0 into 0, as JSON would
      if (!(Math.abs(x) <= SAMPLE_LIMIT)) break; // NaN, ±Infinity or too large to square
      if (head === 0 && count >= width) {
        // A block of W samples is complete and fills the ring. One pass keeps its suffix extrema and
        // recomputes S₁ and S₂ around K from scratch (ending any drift of the running sums).
        let lo = Infinity;
        let hi = -Infinity;
        let t1 = 0;
        let t2 = 0;
        for (let j = width - 1; j >= 0; j--) {
          const v = ring[j] as number;
          if (v < lo) lo = v;
          if (v > hi) hi = v;
          sufMin[j] = lo;
          sufMax[j] = hi;
          const dv = v - k;
          t1 += dv;
          t2 += dv * dv;
        }
        s1 = t1;
        s2 = t2;
        since = 0;
        check = 0; // look at the shift right away
      }
      // K moves to the window mean when it has left it by more than a standard deviation,
      // S₁² > n·S₂/2, with the offset more than rounding of K itself; looked at after each block
      // and every 8th sample from W/4 samples after a recomputation.
      if (since === check) {
        if (s1 * s1 > 0.5 * size * s2 && Math.abs(s1) > size * 2 ** -40 * Math.abs(k)) {
          this.#head = head;
          this.#size = size;
          this.#shift = k;
          this.#rebuild();
          k = this.#shift;
          s1 = this.#sum;
          s2 = this.#sumSq;
          since = 0;
        }
        check = nextCheck(since, earliest);
      }
      if (count === 0) k = x;
      const d = x - k; // d = x − K
      if (size === width) {
        const e = (ring[head] as number) - k; // the oldest sample, leaving
        s1 += d - e;
        s2 += d * d - e * e;
        if (s2 < 0) s2 = 0; // rounding can take a sum of squares a hair below 0
      } else {
        s1 += d;
        s2 += d * d;
        size++;
      }
      if (head === 0) {
        preMin = x;
        preMax = x;
      } else {
        if (x < preMin) preMin = x;
        if (x > preMax) preMax = x;
      }
      ring[head] = x;
      head = head + 1 === width ? 0 : head + 1;
      count++;
      since++;
      // The samples after this one, up to the next that starts a block or is due for a look at the
      // shift, take the full-window step alone: the same arithmetic without the per-sample tests.
      if (size === width && head !== 0) {
        let m = check - since; // samples before the next look at the shift
        if (width - head < m) m = width - head; // … and before the block ends
        if (xs.length - i - 1 < m) m = xs.length - i - 1;
        const first = i + 1;
        const stop = first + m;
        let t = first;
        for (; t < stop; t++) {
          const y = (xs[t] as number) + 0;
          if (!(Math.abs(y) <= SAMPLE_LIMIT)) break; // left to the outer loop, which stops there
          const dy = y - k;
          const ey = (ring[head] as number) - k;
          s1 += dy - ey;
          s2 += dy * dy - ey * ey;
          if (s2 < 0) s2 = 0;
          if (y < preMin) preMin = y;
          if (y > preMax) preMax = y;
          ring[head] = y;
          head++;
        }
        const taken = t - first;
        if (head === width) head = 0;
        count += taken;
        since += taken;
        i += taken;
      }
    }
    this.#head = head;
    this.#size = size;
    this.#count = count;
    this.#sinceRebuild = since;
    this.#shift = k;
    this.#sum = s1;
    this.#sumSq = s2;
    this.#preMin = preMin;
    this.#preMax = preMax;
    return i;
  }

  /** Rebuilds the running and suffix extrema from the ring, as the loop would have left them after `count` samples. */
  #restoreExtrema(count: number): void {
    if (count === 0) return;
    const width = this.#width;
    const ring = this.#ring;
    const newest = (count - 1) % width; // the current block holds ring[0..newest]
    let lo = Infinity;
    let hi = -Infinity;
    for (let j = 0; j <= newest; j++) {
      const v = ring[j] as number;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
    this.#preMin = lo;
    this.#preMax = hi;
    if (count <= width) return;
    lo = Infinity;
    hi = -Infinity;
    for (let j = width - 1; j > newest; j--) {
      const v = ring[j] as number;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
      this.#sufMin[j] = lo;
      this.#sufMax[j] = hi;
    }
  }

  /**
   * Moves K to the window mean and recomputes S₁ and S₂ around it from the
   * ring (two passes, oldest sample first).
   */
  #rebuild(): void {
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
