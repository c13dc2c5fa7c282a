import { acceptSample, MAX_SAMPLE_MAGNITUDE, requireBatch } from "./samples.js";
import {
  envelope,
  nonFiniteOption,
  openSnapshot,
  optionsObject,
  integerInRange,
  toPlainArray,
  type NonFinitePolicy,
  type Snapshot,
} from "@leeway/core";
import { mannKendallVariance, mannKendallZ, theilSenOfSeries, tieSum, tieTerm } from "./mann-kendall.js";

/** The widest window {@link WindowTrend} accepts (its Theil–Sen slope holds W(W−1)/2 pairwise slopes). */
export const WINDOW_TREND_MAX_WIDTH = 4096;

/** Options of {@link WindowTrend}. */
export interface WindowTrendOptions {
  /** W: the number of most recent samples tested (an integer in [2, 4096]). */
  width: number;
  /** What to do with NaN or ±Infinity samples: `"refuse"` (default) throws, `"skip"` counts them. */
  nonFinite?: NonFinitePolicy;
}

/** What {@link WindowTrend.observe} returns. */
export interface WindowTrendReading {
  /** Samples taken since the start. */
  count: number;
  /** Samples in the window, min(count, W). */
  size: number;
  /** Mann–Kendall S over the window. */
  s: number;
  /** Tie-corrected Var(S). */
  variance: number;
  /** Continuity-corrected z (0 when S = 0). */
  z: number;
  /** Two-sided p-value of "no monotone trend". */
  pValue: number;
  skipped: number;
}

/** The plain state inside a {@link WindowTrend} snapshot. */
export interface WindowTrendState {
  width: number;
  nonFinite: NonFinitePolicy;
  count: number;
  skipped: number;
  /** The samples in the window, oldest first; S and the tie term are recomputed from them. */
  window: number[];
}

/**
 * A sliding-window test for a monotone trend in a score stream — the
 * evidence of slow degradation — and its slope.
 *
 * Method: the Mann–Kendall statistic S = Σ_{i<j} sign(x_j − x_i) over the
 * last W samples (Mann, 1945; Kendall, 1975), kept up to date in O(W) per
 * sample: when x_new enters and x_old leaves,
 * S ← S + Σ_j [sign(x_new − x_j) − sign(x_j − x_old)] over the samples that
 * stay. The tie term Σ t(t−1)(2t+5) of Var(S) = [n(n−1)(2n+5) − Σ t(t−1)(2t+5)]/18
 * is kept exactly the same way, from the number of window values equal to
 * x_new and to x_old. z carries the continuity correction, (S ∓ 1)/√Var(S);
 * the p-value is two-sided. S and the tie term are integers, so the
 * incremental values equal a recomputation exactly. `slope()` is the
 * Theil–Sen estimator (Theil, 1950; Sen, 1968) over the window, computed on
 * demand in O(W²).
 *
 * @example
 * const t = new WindowTrend({ width: 14 });
 * t.observeMany(Float64Array.from([12.9, 14.8, 13.2, 15.7, 13.8, 15.6, 12.9, 11.0, 17.3, 15.9, 19.0, 18.3, 20.1, 21.7]));
 * [t.s, t.variance.toFixed(3), t.z.toFixed(4)]; // [54, "332.667", "2.9058"]
 */
export class WindowTrend {
  static readonly kind = "leeway.stats.window-trend";
  static readonly version = 1;

  readonly #width: number;
  readonly #policy: NonFinitePolicy;
  readonly #ring: Float64Array;
  #head = 0; // where the next sample goes (the oldest sample once full)
  #size = 0;
  #count = 0;
  #skipped = 0;
  #s = 0; // Mann–Kendall S
  #ties = 0; // Σ t(t−1)(2t+5) over tie groups in the window

  constructor(options: WindowTrendOptions) {
    const o = optionsObject<WindowTrendOptions>("WindowTrend", options, ["width", "nonFinite"]);
    this.#width = integerInRange("WindowTrend", "width", o.width, 2, WINDOW_TREND_MAX_WIDTH);
    this.#policy = nonFiniteOption("WindowTrend", o.nonFinite);
    this.#ring = new Float64Array(this.#width);
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

  /** Mann–Kendall S over the window. */
  get s(): number {
    return this.#s;
  }

  /** Tie-corrected Var(S) over the window (0 below two samples). */
  get variance(): number {
    return this.#size < 2 ? 0 : mannKendallVariance(this.#size, this.#ties);
  }

  /** Continuity-corrected z; 0 when S = 0 or Var(S) = 0. */
  get z(): number {
    return mannKendallZ(this.#s, this.variance).z;
  }

  /** Two-sided p-value of "no monotone trend"; 1 when S = 0. */
  get pValue(): number {
    return mannKendallZ(this.#s, this.variance).pValue;
  }

  /** Takes one sample; returns S, its variance, z and the p-value over the window. */
  observe(x: number): WindowTrendReading {
    if (acceptSample("WindowTrend", "x", this.#policy, x, MAX_SAMPLE_MAGNITUDE)) {
      this.#push(x);
    } else {
      this.#skipped++;
    }
    const variance = this.variance;
    const { z, pValue } = mannKendallZ(this.#s, variance);
    return { count: this.#count, size: this.#size, s: this.#s, variance, z, pValue, skipped: this.#skipped };
  }

  /** Takes every sample of `xs`; the same state as `observe` on each. */
  observeMany(xs: Float64Array): void {
    requireBatch("WindowTrend", xs);
    for (let i = 0; i < xs.length; i++) {
      const x = xs[i] as number;
      if (Math.abs(x) <= MAX_SAMPLE_MAGNITUDE) this.#push(x);
      else this.observe(x);
    }
  }

  /** Theil–Sen slope over the window, in score units per sample step; NaN below two samples. O(W²). */
  slope(): number {
    return theilSenOfSeries(this.values());
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
  snapshot(): Snapshot<WindowTrendState> {
    return envelope(WindowTrend.kind, WindowTrend.version, {
      width: this.#width,
      nonFinite: this.#policy,
      count: this.#count,
      skipped: this.#skipped,
      window: toPlainArray(this.values()),
    });
  }

  /** Rebuilds a window from {@link WindowTrend.snapshot}; it continues exactly like the original. */
  static restore(snapshot: unknown): WindowTrend {
    const r = openSnapshot(snapshot, WindowTrend.kind, WindowTrend.version);
    const width = r.integer("width", 2, WINDOW_TREND_MAX_WIDTH);
    const policy = r.oneOf("nonFinite", ["refuse", "skip"] as const);
    const count = r.integer("count", 0, Number.MAX_SAFE_INTEGER);
    const skipped = r.integer("skipped", 0, Number.MAX_SAFE_INTEGER);
    const size = Math.min(count, width);
    const window = r.numbers("window", size);
    const t = new WindowTrend({ width, nonFinite: policy });
    let s = 0;
    for (let i = 0; i < size; i++) {
      const xi = window[i] as number;
      for (let j = i + 1; j < size; j++) s += Math.sign((window[j] as number) - xi);
    }
    t.#ring.set(window);
    t.#size = size;
    t.#head = size === width ? 0 : size;
    t.#count = count;
    t.#skipped = skipped;
    t.#s = s;
    t.#ties = tieSum(window);
    return t;
  }

  #push(x: number): void {
    x += 0; // −0 becomes 0, as it would through JSON
    const ring = this.#ring;
    const width = this.#width;
    const n = this.#size;
    const head = this.#head;
    let ds = 0;
    let equalNew = 0;
    if (n === width) {
      // x_old (at head) leaves, x_new enters: S += Σ_j sign(x_new − x_j) − sign(x_j − x_old) over the others.
      const old = ring[head] as number;
      let equalOld = 0;
      for (let j = 0; j < width; j++) {
        if (j === head) continue;
        const v = ring[j] as number;
        ds += Math.sign(x - v) - Math.sign(v - old);
        if (v === x) equalNew++;
        if (v === old) equalOld++;
      }
      // The old value's tie group shrinks from equalOld + 1 to equalOld, the new one's grows from equalNew to equalNew + 1.
      this.#ties += tieTerm(equalOld) - tieTerm(equalOld + 1) + tieTerm(equalNew + 1) - tieTerm(equalNew);
    } else {
      for (let j = 0; j < n; j++) {
        const v = ring[j] as number;
        ds += Math.sign(x - v);
        if (v === x) equalNew++;
      }
      this.#ties += tieTerm(equalNew + 1) - tieTerm(equalNew);
      this.#size = n + 1;
    }
    this.#s += ds;
    ring[head] = x;
    this.#head = head + 1 === width ? 0 : head + 1;
    this.#count++;
  }
}
