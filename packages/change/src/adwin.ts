import {
  envelope,
  integerInRange,
  nonFiniteOption,
  NonFiniteError,
  numberInRange,
  oneOf,
  openSnapshot,
  optionsObject,
  positiveInteger,
  positiveNumber,
  type NonFinitePolicy,
  type Snapshot,
} from "@leeway/core";
import type { ChangeDirection, ChangeReading, ChangeTest } from "./change-test.js";
import { acceptSample, MAX_SAMPLE_MAGNITUDE } from "@leeway/stats";
import { scanStart, warningFractionOption } from "./options.js";
import { buildFromSnapshot } from "./restore-support.js";

/** Which bound ε_cut an {@link Adwin} uses. */
export type AdwinBound = "variance" | "hoeffding";

/** Options of {@link Adwin}. */
export interface AdwinOptions {
  /** Confidence δ in (0, 1) (default 0.002): the chance of a false cut per check is at most δ. */
  delta?: number;
  /** Buckets per level M of the exponential histogram (default 5; memory and resolution grow with it). */
  buckets?: number;
  /** Test the cuts every this many samples (default 32). */
  checkPeriod?: number;
  /** Smallest sub-window on either side of a cut, in samples (default 5). */
  minSubWindow?: number;
  /** `"variance"` (default: the Bernstein-type bound used in practice) or `"hoeffding"` (for values in [0, 1]). */
  bound?: AdwinBound;
  /** Scale of ε_cut: cut when |μ̂₀ − μ̂₁| ≥ threshold·ε_cut (default 1, the published test; calibrate it for a target ARL0). */
  threshold?: number;
  /** `"warning"` once the statistic passes this fraction of the threshold (default 0.5). */
  warningFraction?: number;
  /** `"refuse"` (default) or `"skip"` non-finite samples. */
  nonFinite?: NonFinitePolicy;
}

/** The reading of an {@link Adwin}: a {@link ChangeReading} with the window's width and mean. */
export interface AdwinReading extends ChangeReading {
  /** Samples in the adaptive window. */
  width: number;
  /** Mean of the window (0 when empty). */
  mean: number;
}

/** Plain state of an {@link Adwin} snapshot. */
export interface AdwinState {
  delta: number;
  buckets: number;
  checkPeriod: number;
  minSubWindow: number;
  bound: AdwinBound;
  threshold: number;
  warningFraction: number;
  nonFinite: NonFinitePolicy;
  levelCounts: number[];
  bucketTotals: number[];
  bucketM2: number[];
  width: number;
  total: number;
  sinceCheck: number;
  statistic: number;
  count: number;
  skipped: number;
}

/** The largest |x| taken (10¹⁰⁰, from @leeway/stats): bucket sums of squares stay finite for 2⁵³ samples. */
const ADWIN_LIMIT = MAX_SAMPLE_MAGNITUDE;
const NAME = "Adwin";
const KNOWN = ["delta", "buckets", "checkPeriod", "minSubWindow", "bound", "threshold", "warningFraction", "nonFinite"] as const;
/** 1 − 10⁻⁶: the safety margin of the check's quick test (far above the few ulps of rounding on either side). */
const PRUNE_MARGIN = 1 - 1e-6;
/** Levels of the exponential histogram: bucket sizes 1, 2, 4, … 2^(MAX_LEVELS − 1). */
const MAX_LEVELS = 52;
/** 2^l for each level l, looked up: an exponent that varies would call the general power function. */
const BUCKET_SIZES = Float64Array.from({ length: MAX_LEVELS }, (_, l) => 2 ** l);

/**
 * ADWIN, the adaptive-window change test of Bifet & Gavaldà (2007), with its exponential histogram
 * (ADWIN2: M buckets of each size 2^l, memory O(M·log(W/M))). The window W holds the latest samples;
 * every `checkPeriod` samples each bucket boundary splits it into an older W₀ and a newer W₁ (n₀, n₁
 * samples, both ≥ `minSubWindow`), and the oldest bucket is dropped while some split has
 * |μ̂₀ − μ̂₁| ≥ ε_cut, with 1/m = 1/n₀ + 1/n₁, δ′ = δ/n and σ²_W the window's variance:
 *
 *   variance bound:  ε_cut = √((2/m)·σ²_W·ln(2/δ′)) + (2/(3m))·ln(2/δ′)
 *   Hoeffding bound: ε_cut = √((1/(2m))·ln(4/δ′))
 *
 * A sample at which the window is cut reads `"change"`; the onset is the first sample of the kept window
 * and the direction says whether the newer part is higher. The statistic is the largest |μ̂₀ − μ̂₁|/ε_cut
 * of the latest check (threshold 1 unless scaled). ADWIN re-arms itself by cutting; `restart()` empties
 * the window.
 * @example
 * const adwin = new Adwin({ delta: 0.002 });
 * const xs = new Float64Array(2000).map((_, i) => (i < 1000 ? 0 : 1));
 * adwin.scan(xs) >= 1000; // true: the first cut comes after the step
 */
export class Adwin implements ChangeTest {
  static readonly kind = "leeway.change.adwin";
  static readonly version = 1;
  readonly name = NAME;
  readonly #delta: number;
  readonly #m: number; // M, buckets per level
  readonly #checkPeriod: number;
  readonly #minSub: number;
  readonly #bound: AdwinBound;
  readonly #threshold: number;
  readonly #warningFraction: number;
  readonly #nonFinite: NonFinitePolicy;
  // Each level is a ring buffer of #cap slots (a power of two ≥ M + 1), its oldest bucket at #heads[l]:
  // merging and dropping move a head instead of shifting the buckets.
  readonly #cap: number;
  readonly #mask: number; // #cap − 1
  readonly #totals: Float64Array; // bucket sums, level-major
  readonly #m2s: Float64Array; // bucket sums of squared deviations
  readonly #levelCounts: Int32Array;
  readonly #heads: Int32Array; // ring position of each level's oldest bucket
  #levels = 0; // levels in use
  #width = 0; // W, samples in the window
  #total = 0; // Σ of the window (its mean is #total/W, exact on integers)
  #sinceCheck = 0;
  #statistic = 0;
  #count = 0;
  #skipped = 0;
  // outcome of the latest step, read by observe()
  #cutStatistic = 0;
  #cutDirection: ChangeDirection = "up";
  readonly #one = new Float64Array(1); // observe(x) runs the batch insertion on [x]

  constructor(options: AdwinOptions = {}) {
    const o = optionsObject<AdwinOptions>(NAME, options, KNOWN);
    this.#delta = o.delta === undefined ? 0.002 : numberInRange(NAME, "delta", o.delta, { min: 0, max: 1, minExclusive: true, maxExclusive: true });
    this.#m = o.buckets === undefined ? 5 : integerInRange(NAME, "buckets", o.buckets, 2, 1000);
    this.#checkPeriod = o.checkPeriod === undefined ? 32 : positiveInteger(NAME, "checkPeriod", o.checkPeriod, 2 ** 20);
    this.#minSub = o.minSubWindow === undefined ? 5 : positiveInteger(NAME, "minSubWindow", o.minSubWindow, 2 ** 30);
    this.#bound = o.bound === undefined ? "variance" : oneOf(NAME, "bound", o.bound, ["variance", "hoeffding"] as const);
    this.#threshold = o.threshold === undefined ? 1 : positiveNumber(NAME, "threshold", o.threshold);
    this.#warningFraction = warningFractionOption(NAME, o.warningFraction);
    this.#nonFinite = nonFiniteOption(NAME, o.nonFinite);
    this.#cap = 1 << Math.ceil(Math.log2(this.#m + 1)); // an int32, so that index arithmetic stays integer
    this.#mask = this.#cap - 1;
    this.#totals = new Float64Array(MAX_LEVELS * this.#cap);
    this.#m2s = new Float64Array(MAX_LEVELS * this.#cap);
    this.#levelCounts = new Int32Array(MAX_LEVELS);
    this.#heads = new Int32Array(MAX_LEVELS);
  }

  /** The scale of ε_cut (1 for the published test). */
  get threshold(): number {
    return this.#threshold;
  }
  /** Samples in the adaptive window. */
  get width(): number {
    return this.#width;
  }
  /** Mean of the window (0 when empty). */
  get mean(): number {
    return this.#width > 0 ? this.#total / this.#width : 0;
  }
  /** Population variance of the window (0 when empty). */
  get variance(): number {
    return this.#width > 0 ? this.#windowM2() / this.#width : 0;
  }
  /** Buckets held (memory is proportional to it). */
  get bucketCount(): number {
    let n = 0;
    for (let l = 0; l < this.#levels; l++) n += this.#levelCounts[l] as number;
    return n;
  }
  /** Finite samples taken. */
  get count(): number {
    return this.#count;
  }
  /** Non-finite samples skipped. */
  get skipped(): number {
    return this.#skipped;
  }

  observe(x: number): AdwinReading {
    const i = this.#count + this.#skipped;
    if (!(typeof x === "number" && Math.abs(x) <= ADWIN_LIMIT)) {
      acceptSample(NAME, "x", this.#nonFinite, x, ADWIN_LIMIT); // throws unless a non-finite number to skip
      this.#skipped += 1;
      return this.#reading(i, false);
    }
    return this.#reading(i, this.#step(x));
  }

  scan(xs: Float64Array, from = 0): number {
    let j = scanStart(NAME, xs, from);
    const n = xs.length;
    const refuse = this.#nonFinite === "refuse";
    while (j < n) {
      // the samples up to the next check go in as one run
      const room = this.#checkPeriod - this.#sinceCheck;
      const stop = n - j < room ? n : j + room;
      const k = this.#insertRun(xs, j, stop);
      if (this.#sinceCheck === this.#checkPeriod && this.#checkAndCut()) return k - 1;
      if (k < stop) {
        // a non-finite sample, or one beyond the accepted range, at xs[k]
        const x = xs[k] as number;
        if (x - x === 0) acceptSample(NAME, `xs[${k}]`, "refuse", x, ADWIN_LIMIT);
        if (refuse) throw new NonFiniteError(NAME, `xs[${k}]`, x);
        this.#skipped += 1;
        j = k + 1;
      } else {
        j = k;
      }
    }
    return -1;
  }

  restart(): void {
    this.#levelCounts.fill(0);
    this.#heads.fill(0);
    this.#levels = 0;
    this.#width = 0;
    this.#total = 0;
    this.#sinceCheck = 0;
    this.#statistic = 0;
  }

  snapshot(): Snapshot<AdwinState> {
    const levelCounts: number[] = [];
    const bucketTotals: number[] = [];
    const bucketM2: number[] = [];
    for (let l = 0; l < this.#levels; l++) {
      const c = this.#levelCounts[l] as number;
      levelCounts.push(c);
      for (let b = 0; b < c; b++) {
        const at = this.#slot(l, b);
        bucketTotals.push(this.#totals[at] as number);
        bucketM2.push(this.#m2s[at] as number);
      }
    }
    return envelope(Adwin.kind, Adwin.version, {
      delta: this.#delta,
      buckets: this.#m,
      checkPeriod: this.#checkPeriod,
      minSubWindow: this.#minSub,
      bound: this.#bound,
      threshold: this.#threshold,
      warningFraction: this.#warningFraction,
      nonFinite: this.#nonFinite,
      levelCounts,
      bucketTotals,
      bucketM2,
      width: this.#width,
      total: this.#total,
      sinceCheck: this.#sinceCheck,
      statistic: this.#statistic,
      count: this.#count,
      skipped: this.#skipped,
    });
  }

  /** Rebuilds an Adwin from {@link Adwin.snapshot}; it continues exactly where the original was. */
  static restore(snapshot: unknown): Adwin {
    const r = openSnapshot(snapshot, Adwin.kind, Adwin.version);
    const delta = r.number("delta");
    const buckets = r.integer("buckets", 2, 1000);
    const checkPeriod = r.integer("checkPeriod", 1, 2 ** 20);
    const minSubWindow = r.integer("minSubWindow", 1, 2 ** 30);
    const bound = r.oneOf("bound", ["variance", "hoeffding"] as const);
    const threshold = r.number("threshold");
    const warningFraction = r.number("warningFraction");
    const nonFinite = r.oneOf("nonFinite", ["refuse", "skip"] as const);
    const levelCounts = r.integers("levelCounts", { max: MAX_LEVELS }, 0, buckets);
    const held = levelCounts.reduce((a, b) => a + b, 0);
    const bucketTotals = r.numbers("bucketTotals", held);
    const bucketM2 = r.numbers("bucketM2", held);
    const count = r.integer("count", 0, Number.MAX_SAFE_INTEGER);
    const skipped = r.integer("skipped", 0, Number.MAX_SAFE_INTEGER);
    const width = r.integer("width", 0, count);
    const total = r.number("total");
    const sinceCheck = r.integer("sinceCheck", 0, checkPeriod - 1);
    const statistic = r.numberIn("statistic", 0, Number.MAX_VALUE);
    let implied = 0;
    levelCounts.forEach((c, l) => (implied += c * 2 ** l));
    if (implied !== width) r.fail("width", `must equal the samples held in the buckets (${implied}), got ${width}`);
    if (levelCounts.length > 0 && levelCounts[levelCounts.length - 1] === 0) r.fail("levelCounts", "must not end with an empty level");
    if (!(Math.abs(total) <= width * ADWIN_LIMIT)) r.fail("total", `must be within ±${width} × ${ADWIN_LIMIT} (the samples held, each within ±${ADWIN_LIMIT}), got ${total}`);
    // a bucket of level l sums 2^l samples within ±ADWIN_LIMIT: |total| ≤ 2^l·LIMIT, 0 ≤ M2 ≤ 2^l·LIMIT²
    let b = 0;
    levelCounts.forEach((c, l) => {
      const size = 2 ** l;
      for (let j = 0; j < c; j++, b++) {
        if (!(Math.abs(bucketTotals[b] as number) <= size * ADWIN_LIMIT)) r.fail(`bucketTotals[${b}]`, `must be within ±${size} × ${ADWIN_LIMIT} for a bucket of ${size} samples, got ${bucketTotals[b]}`);
        if (!((bucketM2[b] as number) >= 0 && (bucketM2[b] as number) <= size * ADWIN_LIMIT * ADWIN_LIMIT)) r.fail(`bucketM2[${b}]`, `must be in [0, ${size} × ${ADWIN_LIMIT}²] for a bucket of ${size} samples, got ${bucketM2[b]}`);
      }
    });
    const test = buildFromSnapshot(Adwin.kind, () => new Adwin({ delta, buckets, checkPeriod, minSubWindow, bound, threshold, warningFraction, nonFinite }));
    let k = 0;
    levelCounts.forEach((c, l) => {
      test.#levelCounts[l] = c;
      for (let b = 0; b < c; b++, k++) {
        test.#totals[l * test.#cap + b] = bucketTotals[k] as number;
        test.#m2s[l * test.#cap + b] = bucketM2[k] as number;
      }
    });
    test.#levels = levelCounts.length;
    test.#width = width;
    test.#total = total;
    test.#sinceCheck = sinceCheck;
    test.#statistic = statistic;
    test.#count = count;
    test.#skipped = skipped;
    return test;
  }

  /** Takes one finite sample; returns true when the window was cut at it. */
  #step(x: number): boolean {
    this.#one[0] = x;
    this.#insertRun(this.#one, 0, 1);
    return this.#sinceCheck === this.#checkPeriod && this.#checkAndCut();
  }

  /** The check due every `checkPeriod` samples: drops the oldest buckets while a split passes; true when it cut. */
  #checkAndCut(): boolean {
    this.#sinceCheck = 0;
    let cut = false;
    for (;;) {
      const result = this.#check();
      if (result === 0) break;
      if (!cut) {
        cut = true;
        this.#cutStatistic = this.#statistic;
        this.#cutDirection = result > 0 ? "up" : "down";
      }
      this.#dropOldest();
    }
    return cut;
  }

  /** Index in #totals and #m2s of bucket b (0: the oldest) of level l. */
  #slot(l: number, b: number): number {
    return l * this.#cap + (((this.#heads[l] as number) + b) & this.#mask);
  }

  /**
   * Takes the finite samples xs[from], xs[from + 1], … before `stop` (at most up to the next check),
   * each as a new bucket of size 1 followed by the histogram's merges; returns where it stopped (at
   * `stop` or at the first non-finite sample). The state stays in locals while it runs, level 0's
   * count and head too: that level changes at every sample, and kept in its typed array each sample's
   * count waited for the previous sample's store.
   */
  #insertRun(xs: Float64Array, from: number, stop: number): number {
    const cap = this.#cap;
    const mask = this.#mask;
    const m = this.#m;
    const counts = this.#levelCounts;
    const heads = this.#heads;
    const totals = this.#totals;
    const m2s = this.#m2s;
    let total = this.#total;
    let width = this.#width;
    let levels = this.#levels;
    let c0 = counts[0] as number;
    let h0 = heads[0] as number;
    let j = from;
    for (; j < stop; j++) {
      const x = xs[j] as number;
      if (!(Math.abs(x) <= ADWIN_LIMIT)) break; // NaN, ±Infinity or beyond the accepted range
      total += x;
      width += 1;
      const at = (h0 + c0) & mask;
      totals[at] = x;
      m2s[at] = 0;
      c0 += 1;
      if (c0 <= m) continue;
      // merge the two oldest buckets of level 0 (one sample each) into one of level 1:
      // d = (t₀ − t₁)·(1/n) and M₂ = M₂,₀ + M₂,₁ + d²·n/2 with n = 1, as #cascade writes them for the levels above
      const i1 = (h0 + 1) & mask;
      const t0 = totals[h0] as number;
      const t1 = totals[i1] as number;
      const d = (t0 - t1) * 1;
      const mergedM2 = (m2s[h0] as number) + (m2s[i1] as number) + d * d * 1 * 0.5;
      h0 = (h0 + 2) & mask;
      c0 -= 2;
      const c1 = counts[1] as number;
      const next = cap + (((heads[1] as number) + c1) & mask);
      totals[next] = t0 + t1;
      m2s[next] = mergedM2;
      counts[1] = c1 + 1;
      if (levels < 2) levels = 2;
      if (c1 + 1 > m) levels = this.#cascade(levels);
    }
    if (j > from && levels === 0) levels = 1;
    counts[0] = c0;
    heads[0] = h0;
    const taken = j - from;
    this.#total = total;
    this.#width = width;
    this.#levels = levels;
    this.#count += taken;
    this.#sinceCheck += taken;
    return j;
  }

  /** The merges from level 1 upward after level 1 gained a bucket; returns the levels in use. */
  #cascade(levels: number): number {
    const cap = this.#cap;
    const mask = this.#mask;
    const m = this.#m;
    const counts = this.#levelCounts;
    const heads = this.#heads;
    const totals = this.#totals;
    const m2s = this.#m2s;
    // n = 2^l and its reciprocal (exact): d = (t₀ − t₁)·(1/n) equals (t₀ − t₁)/n bit for bit
    for (let l = 1, n = 2, inverse = 0.5; (counts[l] as number) > m; l++, n *= 2, inverse *= 0.5) {
      // merge the two oldest buckets of level l (each of n = 2^l samples) into one of level l + 1
      if (l + 1 >= MAX_LEVELS) throw new RangeError("Adwin: window too long for the histogram");
      const base = l * cap;
      const h = heads[l] as number;
      const i0 = base + h;
      const i1 = base + ((h + 1) & mask);
      const t0 = totals[i0] as number;
      const t1 = totals[i1] as number;
      const d = (t0 - t1) * inverse;
      const mergedTotal = t0 + t1;
      const mergedM2 = (m2s[i0] as number) + (m2s[i1] as number) + d * d * n * 0.5; // M₂,₀ + M₂,₁ + n·d²/2
      heads[l] = (h + 2) & mask;
      counts[l] = (counts[l] as number) - 2;
      const cn = counts[l + 1] as number;
      const next = (l + 1) * cap + (((heads[l + 1] as number) + cn) & mask);
      totals[next] = mergedTotal;
      m2s[next] = mergedM2;
      counts[l + 1] = cn + 1;
      if (l + 2 > levels) levels = l + 2;
    }
    return levels;
  }

  /** Drops the oldest bucket (the head of the highest level) and updates the window's moments. */
  #dropOldest(): void {
    const top = this.#levels - 1;
    const nb = BUCKET_SIZES[top] as number;
    const h = this.#heads[top] as number;
    const tb = this.#totals[top * this.#cap + h] as number;
    const rest = this.#width - nb;
    this.#total = rest === 0 ? 0 : this.#total - tb;
    this.#width = rest;
    this.#heads[top] = (h + 1) & this.#mask;
    this.#levelCounts[top] = (this.#levelCounts[top] as number) - 1;
    while (this.#levels > 0 && this.#levelCounts[this.#levels - 1] === 0) this.#levels -= 1;
  }

  /**
   * Tests every bucket boundary; sets the statistic (largest |μ̂₀ − μ̂₁|/ε_cut) and returns +1 or −1
   * (newer part higher or lower) for the first split that passes the threshold, 0 when none does.
   */
  #check(): number {
    const w = this.#width;
    const minSub = this.#minSub;
    this.#statistic = 0;
    if (w < 2 * minSub) return 0;
    const total = this.#total;
    const variance = this.#bound === "hoeffding" ? 0 : this.#windowM2() / w;
    const hoeffding = this.#bound === "hoeffding";
    // ln(2/δ′) or ln(4/δ′) with δ′ = δ/W
    const logTerm = Math.log(((hoeffding ? 4 : 2) * w) / this.#delta);
    // ε_cut = √(a/m) + c/m with a, c fixed for this check
    const a = hoeffding ? 0.5 * logTerm : 2 * variance * logTerm;
    const c3 = hoeffding ? 0 : (2 / 3) * logTerm;
    const threshold = this.#threshold;
    const cap = this.#cap;
    const mask = this.#mask;
    const aw = a * w;
    const counts = this.#levelCounts;
    const heads = this.#heads;
    const totals = this.#totals;
    let best = 0;
    let bestSquared = 0; // best²·a·W·(1 − 10⁻⁶)
    let n0 = 0;
    let s0 = 0;
    let size = this.#levels > 0 ? (BUCKET_SIZES[this.#levels - 1] as number) : 0.5;
    for (let l = this.#levels - 1; l >= 0; l--, size /= 2) {
      const c = counts[l] as number;
      const base = l * cap;
      const h = heads[l] as number;
      for (let b = 0; b < c; b++) {
        n0 += size;
        s0 += totals[base + ((h + b) & mask)] as number;
        const n1 = w - n0;
        if (n1 < minSub) {
          this.#statistic = best;
          return 0;
        }
        if (n0 < minSub) continue;
        // μ̂₁ − μ̂₀ = D/P with D = n₀·Σ_W − W·Σ₀ and P = n₀n₁, and 1/m = W/P. Since ε_cut ≥ √(a·W/P),
        // a split with D² ≤ best²·a·W·P·(1 − 10⁻⁶) has |μ̂₁ − μ̂₀| < best·ε_cut (the margin covers the
        // rounding of both sides) and can neither raise the statistic nor pass the threshold (which
        // exceeds best): it is passed over without a division or square root.
        const p = n0 * n1;
        const dd = n0 * total - w * s0;
        const bound = bestSquared * p;
        if (dd * dd <= bound && bound < Infinity) continue; // (an overflowed bound proves nothing)
        const inv = 1 / p;
        const invM = w * inv;
        const eps = Math.sqrt(a * invM) + c3 * invM;
        const diff = dd * inv;
        const size0 = Math.abs(diff);
        if (size0 > best * eps) {
          best = size0 / eps;
          bestSquared = best * best * aw * PRUNE_MARGIN;
        }
        if (size0 >= threshold * eps) {
          this.#statistic = best;
          return diff > 0 ? 1 : -1;
        }
      }
    }
    this.#statistic = best;
    return 0;
  }

  /**
   * M₂ of the window from its buckets (Chan, Golub & LeVeque, 1979): Σ_b [M₂,b + n_b·(μ_b − μ_W)²],
   * computed at check time so that no division sits on the per-sample path.
   */
  #windowM2(): number {
    const w = this.#width;
    if (w === 0) return 0;
    const mean = this.#total / w;
    const cap = this.#cap;
    const mask = this.#mask;
    const levels = this.#levels;
    const counts = this.#levelCounts;
    const heads = this.#heads;
    const totals = this.#totals;
    const m2s = this.#m2s;
    let m2 = 0;
    let size = 1;
    for (let l = 0; l < levels; l++, size *= 2) {
      const inv = 1 / size; // a power of two: exact
      const c = counts[l] as number;
      const base = l * cap;
      const h = heads[l] as number;
      for (let b = 0; b < c; b++) {
        const at = base + ((h + b) & mask);
        const d = (totals[at] as number) * inv - mean;
        m2 += (m2s[at] as number) + size * d * d;
      }
    }
    return m2;
  }

  #reading(i: number, cut: boolean): AdwinReading {
    const width = this.#width;
    const mean = width > 0 ? this.#total / width : 0;
    if (cut) {
      return { index: i, status: "change", statistic: this.#cutStatistic, threshold: this.#threshold, direction: this.#cutDirection, onset: i - width + 1, skipped: this.#skipped, width, mean };
    }
    const status = this.#statistic > this.#warningFraction * this.#threshold ? "warning" : "stable";
    return { index: i, status, statistic: this.#statistic, threshold: this.#threshold, skipped: this.#skipped, width, mean };
  }
}
