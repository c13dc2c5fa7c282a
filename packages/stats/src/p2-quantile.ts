import {
  envelope,
  nonFiniteOption,
  NonFiniteError,
  numberInRange,
  openSnapshot,
  optionsObject,
  SnapshotError,
  toPlainArray,
  type NonFinitePolicy,
  type Snapshot,
} from "@leeway/core";

/** Options of {@link P2Quantile}. */
export interface P2QuantileOptions {
  /** The quantile to track, p in (0, 1) (0.99 for the 99th percentile). */
  p: number;
  /** What to do with NaN or ±Infinity samples: `"refuse"` (default) throws, `"skip"` counts them. */
  nonFinite?: NonFinitePolicy;
}

/** What {@link P2Quantile.observe} returns. */
export interface P2QuantileReading {
  count: number;
  /** The current estimate of the p-quantile. */
  estimate: number;
  skipped: number;
}

/** The plain state inside a {@link P2Quantile} snapshot. */
export interface P2QuantileState {
  p: number;
  nonFinite: NonFinitePolicy;
  count: number;
  skipped: number;
  /** Marker heights q₁..q₅ (while count < 5: the first samples in arrival order, then zeros). */
  heights: number[];
  /** Marker positions n₁..n₅ (1-based ranks). */
  positions: number[];
}

/**
 * A running estimate of one quantile of a score stream in O(1) memory and
 * time, without storing the samples.
 *
 * Method: the P² algorithm of Jain & Chlamtac (1985): five markers at the
 * minimum, p/2, p, (1+p)/2 and the maximum; each sample shifts the positions
 * nᵢ of the markers above it, and a middle marker that is off its desired
 * position n′ᵢ = 1 + (count − 1)·fᵢ (fᵢ = 0, p/2, p, (1+p)/2, 1) by one or more
 * moves by one step d = ±1, its height following the piecewise-parabolic
 * formula
 * q′ᵢ = qᵢ + d/(nᵢ₊₁ − nᵢ₋₁)·[(nᵢ − nᵢ₋₁ + d)(qᵢ₊₁ − qᵢ)/(nᵢ₊₁ − nᵢ) + (nᵢ₊₁ − nᵢ − d)(qᵢ − qᵢ₋₁)/(nᵢ − nᵢ₋₁)]
 * or, when that would leave (qᵢ₋₁, qᵢ₊₁), the linear one. The desired
 * positions are computed from the count (not accumulated), so they do not
 * drift. The estimate is the middle marker q₃; before five samples it is the
 * sample quantile of the samples so far (linear interpolation between order
 * statistics). Error: no guaranteed bound; on smooth distributions the
 * estimate converges to the p-quantile, typically within a fraction of a
 * percent of rank after a few thousand samples; far tails (p ≥ 0.99) need
 * correspondingly more samples.
 *
 * @example
 * const q = new P2Quantile({ p: 0.5 });
 * q.observeMany(Float64Array.from([0.02, 0.15, 0.74, 3.39, 0.83, 22.37, 10.15, 15.43, 38.62, 15.92]));
 * q.estimate.toFixed(2); // "4.75" (Jain & Chlamtac 1985, worked example after 10 samples)
 */
export class P2Quantile {
  static readonly kind = "leeway.stats.p2-quantile";
  static readonly version = 1;

  readonly #p: number;
  readonly #policy: NonFinitePolicy;
  readonly #q = new Float64Array(5); // marker heights q₁..q₅
  readonly #n = new Float64Array(5); // marker positions n₁..n₅
  readonly #f: Float64Array; // desired-position increments fᵢ
  #count = 0;
  #skipped = 0;

  constructor(options: P2QuantileOptions) {
    const o = optionsObject<P2QuantileOptions>("P2Quantile", options, ["p", "nonFinite"]);
    this.#p = numberInRange("P2Quantile", "p", o.p, { min: 0, max: 1, minExclusive: true, maxExclusive: true });
    this.#policy = nonFiniteOption("P2Quantile", o.nonFinite);
    this.#f = Float64Array.from([0, this.#p / 2, this.#p, (1 + this.#p) / 2, 1]);
    for (let i = 0; i < 5; i++) this.#n[i] = i + 1;
  }

  /** The tracked quantile p. */
  get p(): number {
    return this.#p;
  }

  /** Samples taken. */
  get count(): number {
    return this.#count;
  }

  /** Non-finite samples skipped under `nonFinite: "skip"`. */
  get skipped(): number {
    return this.#skipped;
  }

  /** The estimate of the p-quantile; NaN before the first sample. */
  get estimate(): number {
    const c = this.#count;
    if (c >= 5) return this.#q[2] as number;
    if (c === 0) return Number.NaN;
    const sorted = this.#q.slice(0, c).sort();
    const h = (c - 1) * this.#p; // sample quantile with linear interpolation between order statistics
    const lo = Math.floor(h);
    const below = sorted[lo] as number;
    return lo + 1 < c ? below + (h - lo) * ((sorted[lo + 1] as number) - below) : below;
  }

  /** The five marker heights q₁..q₅ (a copy; meaningful from five samples on). */
  heights(): Float64Array {
    return this.#q.slice();
  }

  /** The five marker positions n₁..n₅ (a copy). */
  positions(): Float64Array {
    return this.#n.slice();
  }

  /** Takes one sample; returns the estimate. */
  observe(x: number): P2QuantileReading {
    if (!Number.isFinite(x)) {
      if (this.#policy === "refuse") throw new NonFiniteError("P2Quantile", "x", x);
      this.#skipped++;
    } else {
      this.#take(x);
    }
    return { count: this.#count, estimate: this.estimate, skipped: this.#skipped };
  }

  /** Takes every sample of `xs`; the same state as `observe` on each. */
  observeMany(xs: Float64Array): void {
    for (let i = 0; i < xs.length; i++) {
      const x = xs[i] as number;
      if (Number.isFinite(x)) this.#take(x);
      else this.observe(x);
    }
  }

  /** The whole state as JSON-safe data. */
  snapshot(): Snapshot<P2QuantileState> {
    return envelope(P2Quantile.kind, P2Quantile.version, {
      p: this.#p,
      nonFinite: this.#policy,
      count: this.#count,
      skipped: this.#skipped,
      heights: toPlainArray(this.#q),
      positions: toPlainArray(this.#n),
    });
  }

  /** Rebuilds an estimator from {@link P2Quantile.snapshot}; it continues exactly like the original. */
  static restore(snapshot: unknown): P2Quantile {
    const r = openSnapshot(snapshot, P2Quantile.kind, P2Quantile.version);
    const p = r.number("p");
    if (!(p > 0 && p < 1)) r.fail("p", `must be in (0, 1), got ${p}`);
    const policy = r.oneOf("nonFinite", ["refuse", "skip"] as const);
    const count = r.integer("count", 0, Number.MAX_SAFE_INTEGER);
    const skipped = r.integer("skipped", 0, Number.MAX_SAFE_INTEGER);
    const heights = r.numbers("heights", 5);
    const positions = r.integers("positions", 5, 1, Number.MAX_SAFE_INTEGER);
    const kind = P2Quantile.kind;
    if (count < 5) {
      if (positions.some((v, i) => v !== i + 1)) throw new SnapshotError(kind, "state.positions", "must be [1, 2, 3, 4, 5] before five samples");
      for (let i = count; i < 5; i++) if (heights[i] !== 0) throw new SnapshotError(kind, `state.heights[${i}]`, "must be 0 until that sample arrives");
    } else {
      if (positions[0] !== 1 || positions[4] !== count) throw new SnapshotError(kind, "state.positions", `must start at 1 and end at the count ${count}`);
      for (let i = 1; i < 5; i++) {
        if ((positions[i] as number) <= (positions[i - 1] as number)) throw new SnapshotError(kind, `state.positions[${i}]`, "must be larger than the position before it");
        if ((heights[i] as number) < (heights[i - 1] as number)) throw new SnapshotError(kind, `state.heights[${i}]`, "must not be below the height before it");
      }
    }
    const q = new P2Quantile({ p, nonFinite: policy });
    q.#q.set(heights);
    q.#n.set(positions);
    q.#count = count;
    q.#skipped = skipped;
    return q;
  }

  #take(x: number): void {
    x += 0; // −0 becomes 0, as it would through JSON
    const q = this.#q;
    const n = this.#n;
    const c = this.#count;
    if (c < 5) {
      q[c] = x;
      this.#count = c + 1;
      if (c === 4) q.sort();
      return;
    }
    // Find the cell k with q_k ≤ x < q_{k+1}, widening the extremes if needed.
    let k: number;
    if (x < (q[0] as number)) {
      q[0] = x;
      k = 0;
    } else if (x >= (q[4] as number)) {
      if (x > (q[4] as number)) q[4] = x;
      k = 3;
    } else {
      k = x < (q[1] as number) ? 0 : x < (q[2] as number) ? 1 : x < (q[3] as number) ? 2 : 3;
    }
    for (let i = k + 1; i < 5; i++) n[i] = (n[i] as number) + 1;
    const count = c + 1;
    this.#count = count;
    // Adjust the middle markers toward their desired positions n′ᵢ = 1 + (count − 1)·fᵢ.
    const f = this.#f;
    for (let i = 1; i < 4; i++) {
      const ni = n[i] as number;
      const d = 1 + (count - 1) * (f[i] as number) - ni;
      const up = (n[i + 1] as number) - ni;
      const down = (n[i - 1] as number) - ni;
      if ((d >= 1 && up > 1) || (d <= -1 && down < -1)) {
        const s = d >= 1 ? 1 : -1;
        const qi = q[i] as number;
        const qUp = q[i + 1] as number;
        const qDown = q[i - 1] as number;
        // Parabolic prediction; symbols as in Jain & Chlamtac (1985), eq. for q′ᵢ.
        const parabolic = qi + (s / (up - down)) * ((s - down) * ((qUp - qi) / up) + (up - s) * ((qi - qDown) / -down));
        if (qDown < parabolic && parabolic < qUp) {
          q[i] = parabolic;
        } else {
          // Linear: qᵢ + d·(q_{i+d} − qᵢ)/(n_{i+d} − nᵢ).
          q[i] = s > 0 ? qi + (qUp - qi) / up : qi - (qDown - qi) / down;
        }
        n[i] = ni + s;
      }
    }
  }
}
