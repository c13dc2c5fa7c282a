import { acceptSample, MAX_SAMPLE_MAGNITUDE, requireBatch, runBatch } from "./samples.js";
import {
  envelope,
  nonFiniteOption,
  numberInRange,
  openSnapshot,
  optionsObject,
  SnapshotError,
  toPlainArray,
  type NonFinitePolicy,
  type Snapshot,
} from "@leeway/core";


// Module-local copies: hot loops read them as plain bindings, whatever the module loader does with imports.
const SAMPLE_LIMIT = MAX_SAMPLE_MAGNITUDE;
const accept = acceptSample;
/** Options of {@link P2Quantile}. */
export interface P2QuantileOptions {
  /** The quantile to track, p in (0, 1) (0.99 for the 99th percentile). */
  p: number;
  /** What to do with NaN, ±Infinity or |x| > 1e100 (whose squares could overflow): `"refuse"` (default) throws, `"skip"` counts them. */
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
  readonly #one = new Float64Array(1); // observe(x) runs the batch loop on [x]
  #count = 0;
  #skipped = 0;

  constructor(options: P2QuantileOptions) {
    const o = optionsObject<P2QuantileOptions>("P2Quantile", options, ["p", "nonFinite"]);
    this.#p = numberInRange("P2Quantile", "p", o.p, { min: 0, max: 1, minExclusive: true, maxExclusive: true });
    this.#policy = nonFiniteOption("P2Quantile", o.nonFinite);
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
    if (accept("P2Quantile", "x", this.#policy, x, SAMPLE_LIMIT)) {
      this.#one[0] = x;
      this.#run(this.#one);
    } else {
      this.#skipped++;
    }
    return { count: this.#count, estimate: this.estimate, skipped: this.#skipped };
  }

  /** Takes every sample of `xs`; the same state as `observe` on each, bit for bit (both run the same loop). */
  observeMany(xs: Float64Array): void {
    runBatch(
      requireBatch("P2Quantile", xs),
      (rest) => this.#run(rest),
      (x) => this.observe(x),
    );
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

  /**
   * Takes xs[0], xs[1], ... up to the first non-finite sample and returns its
   * index (xs.length when all are finite); the markers live in locals.
   */
  #run(xs: Float64Array): number {
    const q = this.#q;
    const n = this.#n;
    let count = this.#count;
    let i = 0;
    for (; count < 5 && i < xs.length; i++) {
      const x = (xs[i] as number) + 0; // + 0 turns −0 into 0, as JSON would
      if (!(Math.abs(x) <= SAMPLE_LIMIT)) {
        this.#count = count;
        return i;
      }
      q[count++] = x;
      if (count === 5) q.sort();
    }
    const f1 = this.#p / 2; // desired-position increments fᵢ
    const f2 = this.#p;
    const f3 = (1 + this.#p) / 2;
    let q0 = q[0] as number;
    let q1 = q[1] as number;
    let q2 = q[2] as number;
    let q3 = q[3] as number;
    let q4 = q[4] as number;
    const n0 = 1;
    let n1 = n[1] as number;
    let n2 = n[2] as number;
    let n3 = n[3] as number;
    let n4 = n[4] as number;
    for (; i < xs.length; i++) {
      const x = (xs[i] as number) + 0;
      if (!(Math.abs(x) <= SAMPLE_LIMIT)) break; // NaN, ±Infinity or too large to square
      // The cell k with q_k ≤ x < q_{k+1} (extremes widened): every marker above it moves up one position.
      if (x < q1) {
        if (x < q0) q0 = x;
        n1++;
        n2++;
        n3++;
      } else if (x < q2) {
        n2++;
        n3++;
      } else if (x < q3) {
        n3++;
      } else if (x > q4) {
        q4 = x;
      }
      n4++;
      count++;
      // Move each middle marker one step toward its desired position n′ᵢ = 1 + (count − 1)·fᵢ when it is off by ≥ 1.
      const c1 = count - 1;
      let d = 1 + c1 * f1 - n1;
      if ((d >= 1 && n2 - n1 > 1) || (d <= -1 && n0 - n1 < -1)) {
        const s = d >= 1 ? 1 : -1;
        q1 = markerHeight(s, q0, q1, q2, n0, n1, n2);
        n1 += s;
      }
      d = 1 + c1 * f2 - n2;
      if ((d >= 1 && n3 - n2 > 1) || (d <= -1 && n1 - n2 < -1)) {
        const s = d >= 1 ? 1 : -1;
        q2 = markerHeight(s, q1, q2, q3, n1, n2, n3);
        n2 += s;
      }
      d = 1 + c1 * f3 - n3;
      if ((d >= 1 && n4 - n3 > 1) || (d <= -1 && n2 - n3 < -1)) {
        const s = d >= 1 ? 1 : -1;
        q3 = markerHeight(s, q2, q3, q4, n2, n3, n4);
        n3 += s;
      }
    }
    if (this.#count >= 5 || count >= 5) {
      q[0] = q0;
      q[1] = q1;
      q[2] = q2;
      q[3] = q3;
      q[4] = q4;
      n[1] = n1;
      n[2] = n2;
      n[3] = n3;
      n[4] = n4;
    }
    this.#count = count;
    return i;
  }
}

/**
 * The new height of a middle marker moved by s = ±1 (Jain & Chlamtac, 1985):
 * the piecewise-parabolic prediction
 * qᵢ + s/(nᵢ₊₁ − nᵢ₋₁)·[(nᵢ − nᵢ₋₁ + s)(qᵢ₊₁ − qᵢ)/(nᵢ₊₁ − nᵢ) + (nᵢ₊₁ − nᵢ − s)(qᵢ − qᵢ₋₁)/(nᵢ − nᵢ₋₁)]
 * when it stays strictly between the neighbours, else the linear one
 * qᵢ + s·(q_{i+s} − qᵢ)/(n_{i+s} − nᵢ).
 */
function markerHeight(s: number, qDown: number, qi: number, qUp: number, nDown: number, ni: number, nUp: number): number {
  const up = nUp - ni;
  const down = nDown - ni;
  const parabolic = qi + (s / (up - down)) * ((s - down) * ((qUp - qi) / up) + (up - s) * ((qi - qDown) / -down));
  if (qDown < parabolic && parabolic < qUp) return parabolic;
  return s > 0 ? qi + (qUp - qi) / up : qi - (qDown - qi) / down;
}
