import { acceptSample, MAX_SAMPLE_MAGNITUDE, requireBatch, runBatch } from "./samples.js";
import {
  envelope,
  nonFiniteOption,
  numberInRange,
  openSnapshot,
  OptionError,
  optionsObject,
  positiveNumber,
  SnapshotError,
  type NonFinitePolicy,
  type Snapshot,
} from "@leeway/core";


// Module-local copies: hot loops read them as plain bindings, whatever the module loader does with imports.
const SAMPLE_LIMIT = MAX_SAMPLE_MAGNITUDE;
const accept = acceptSample;
/**
 * The batch loop once W has reached its fixed point: r = 1/W is constant, so
 * x̄ ← (1 − r)x̄ + r·x and S ← λS + (x − x̄_old)(x − x̄_new) need no division.
 * Runs from xs[from] to the first sample it may not take and returns that
 * index; `state` holds [x̄, S] in and out. A function of its own, so that the
 * engine optimises this loop by itself.
 *
 * The state is written back after every 256 samples, not once after the
 * loop: the engine may compile this function while its first call is still
 * in the loop, and code after the loop would then not have run yet; the
 * compiled code would bail out there at the end of every later call (and,
 * in some processes, leave the loop to slower code: the batch ran at 2× or
 * 5× the sum loop by chance).
 */
function steadyRun(xs: Float64Array, from: number, state: Float64Array, lambda: number, r: number): number {
  const c = 1 - r;
  let mean = state[0] as number;
  let s = state[1] as number;
  const len = xs.length;
  let i = from;
  while (i < len) {
    const stop = i + 256 < len ? i + 256 : len;
    for (; i < stop; i++) {
      const x = xs[i] as number;
      if (!(Math.abs(x) <= SAMPLE_LIMIT)) break; // NaN, ±Infinity or too large to square
      const m = c * mean + r * x; // x̄ ← (1 − r)x̄ + r·x
      const p = (x - mean) * (x - m); // (x − x̄_old)(x − x̄_new)
      s = lambda * s + (p > 0 ? p : 0); // S ← λS + p
      mean = m;
    }
    state[0] = mean;
    state[1] = s;
    if (i < stop) break; // stopped at a sample it may not take
  }
  return i;
}

/** Options of {@link EwMoments}: give exactly one of `halfLife` and `alpha`. */
export interface EwMomentsOptions {
  /** Samples after which a sample's weight has halved (> 0); α = 1 − 2^(−1/halfLife). */
  halfLife?: number;
  /** Smoothing factor α in (0, 1]: the weight of the newest sample once warmed up. */
  alpha?: number;
  /** What to do with NaN, ±Infinity or |x| > 1e100 (whose squares could overflow): `"refuse"` (default) throws, `"skip"` counts them. */
  nonFinite?: NonFinitePolicy;
}

/** What {@link EwMoments.observe} returns. */
export interface EwMomentsReading {
  count: number;
  /** Exponentially weighted mean. */
  mean: number;
  /** Exponentially weighted (population) variance. */
  variance: number;
  skipped: number;
}

/** The plain state inside an {@link EwMoments} snapshot. */
export interface EwMomentsState {
  alpha: number;
  nonFinite: NonFinitePolicy;
  count: number;
  skipped: number;
  /** W = Σ(1 − α)^(t−i), the total weight of the samples seen. */
  weight: number;
  mean: number;
  /** S = Σ(1 − α)^(t−i)(x_i − x̄)². */
  s: number;
}

/**
 * Exponentially weighted mean and variance of a score stream: recent samples
 * count more, a sample's weight halving every `halfLife` samples.
 *
 * Method: the normalised weighted recursions (West, 1979, with decaying
 * weights) — with λ = 1 − α, W ← λW + 1, r = 1/W,
 * x̄ ← (1 − r)·x̄ + r·x and S ← λS + (x − x̄_old)(x − x̄_new); mean = x̄,
 * variance = S/W. Because every weight is divided by the weight actually
 * seen, there is no start-up bias toward an initial value: during warm-up
 * the readings equal the exactly weighted mean and variance of the samples
 * so far (the bias correction), and they converge to the classical EWMA
 * x̄ ← x̄ + α(x − x̄) as W → 1/α.
 *
 * @example
 * const ew = new EwMoments({ halfLife: 1 }); // α = 1/2
 * ew.observe(1);
 * ew.observe(4).mean; // 3: weights 1/3 and 2/3
 */
export class EwMoments {
  static readonly kind = "leeway.stats.ew-moments";
  static readonly version = 1;

  readonly #alpha: number;
  readonly #lambda: number;
  readonly #policy: NonFinitePolicy;
  #count = 0;
  #skipped = 0;
  #weight = 0;
  #r = 0; // 1/W, kept so that a converged W costs no division
  readonly #steady = new Float64Array(2); // mean and S handed to and from steadyRun
  #mean = 0;
  #s = 0;

  constructor(options: EwMomentsOptions) {
    const o = optionsObject<EwMomentsOptions>("EwMoments", options, ["halfLife", "alpha", "nonFinite"]);
    if ((o.halfLife === undefined) === (o.alpha === undefined)) {
      throw new OptionError("EwMoments", "halfLife", o.halfLife, "given, or else alpha given (exactly one of the two)");
    }
    if (o.halfLife !== undefined) {
      const h = positiveNumber("EwMoments", "halfLife", o.halfLife);
      this.#alpha = -Math.expm1(-Math.LN2 / h); // α = 1 − 2^(−1/h)
    } else {
      this.#alpha = numberInRange("EwMoments", "alpha", o.alpha, { min: 0, max: 1, minExclusive: true });
    }
    this.#lambda = 1 - this.#alpha;
    this.#policy = nonFiniteOption("EwMoments", o.nonFinite);
  }

  /** The smoothing factor α. */
  get alpha(): number {
    return this.#alpha;
  }

  /** The half-life in samples, ln 2 / −ln(1 − α) (0 when α = 1). */
  get halfLife(): number {
    return this.#alpha === 1 ? 0 : Math.LN2 / -Math.log1p(-this.#alpha);
  }

  /** Samples taken. */
  get count(): number {
    return this.#count;
  }

  /** Non-finite samples skipped under `nonFinite: "skip"`. */
  get skipped(): number {
    return this.#skipped;
  }

  /** Exponentially weighted mean; NaN before the first sample. */
  get mean(): number {
    return this.#count === 0 ? Number.NaN : this.#mean;
  }

  /** Exponentially weighted population variance S/W; NaN before the first sample. */
  get variance(): number {
    return this.#count === 0 ? Number.NaN : this.#s * this.#r; // S/W, as S·(1/W)
  }

  /** √variance. */
  get std(): number {
    return Math.sqrt(this.variance);
  }

  /** Takes one sample; returns the weighted mean and variance so far. */
  observe(x: number): EwMomentsReading {
    if (typeof x === "number" && Math.abs(x) <= SAMPLE_LIMIT) {
      const lambda = this.#lambda;
      const weight = lambda * this.#weight + 1; // W ← λW + 1
      const r = weight === this.#weight ? this.#r : 1 / weight; // W at its fixed point keeps its 1/W
      const old = this.#mean;
      const mean = (1 - r) * old + r * x; // x̄ ← (1 − r)x̄ + r·x
      // S ← λS + (x − x̄_old)(x − x̄_new); the product can round to −ulp², so it is taken ≥ 0.
      const p = (x - old) * (x - mean);
      const s = lambda * this.#s + (p > 0 ? p : 0);
      this.#s = s;
      this.#mean = mean;
      this.#weight = weight;
      this.#r = r;
      this.#count++;
      return { count: this.#count, mean, variance: s * r, skipped: this.#skipped };
    }
    accept("EwMoments", "x", this.#policy, x, SAMPLE_LIMIT); // throws unless a non-finite number to skip
    this.#skipped++;
    return { count: this.#count, mean: this.mean, variance: this.variance, skipped: this.#skipped };
  }

  /**
   * Takes every sample of `xs`; the same state as `observe` on each, bit for
   * bit. Once W has reached its fixed point λW + 1 = W in floating point (a
   * few dozen half-lives in), r = 1/W is a constant and the loop skips the
   * division; the arithmetic stays the same.
   */
  observeMany(xs: Float64Array): void {
    runBatch(
      requireBatch("EwMoments", xs),
      (rest) => this.#run(rest),
      (x) => this.observe(x),
    );
  }

  /** Takes xs[0], xs[1], ... up to the first non-finite sample and returns its index (xs.length when all are finite). */
  #run(xs: Float64Array): number {
    const lambda = this.#lambda;
    let weight = this.#weight;
    let mean = this.#mean;
    let s = this.#s;
    let i = 0;
    const len = xs.length;
    while (i < len && lambda * weight + 1 !== weight) {
      const x = xs[i] as number;
      if (!(Math.abs(x) <= SAMPLE_LIMIT)) break; // NaN, ±Infinity or too large to square
      const w = lambda * weight + 1; // W ← λW + 1
      const r = 1 / w;
      const m = (1 - r) * mean + r * x;
      const p = (x - mean) * (x - m);
      s = lambda * s + (p > 0 ? p : 0);
      mean = m;
      weight = w;
      i++;
    }
    if (i < len && lambda * weight + 1 === weight) {
      const steady = this.#steady;
      steady[0] = mean;
      steady[1] = s;
      i = steadyRun(xs, i, steady, lambda, 1 / weight);
      mean = steady[0] as number;
      s = steady[1] as number;
    }
    this.#count += i;
    this.#weight = weight;
    this.#r = weight === 0 ? 0 : 1 / weight;
    this.#mean = mean;
    this.#s = s;
    return i;
  }

  /** The whole state as JSON-safe data. */
  snapshot(): Snapshot<EwMomentsState> {
    return envelope(EwMoments.kind, EwMoments.version, {
      alpha: this.#alpha,
      nonFinite: this.#policy,
      count: this.#count,
      skipped: this.#skipped,
      weight: this.#weight,
      mean: this.#mean,
      s: this.#s,
    });
  }

  /** Rebuilds an accumulator from {@link EwMoments.snapshot}; it continues exactly like the original. */
  static restore(snapshot: unknown): EwMoments {
    const r = openSnapshot(snapshot, EwMoments.kind, EwMoments.version);
    const alpha = r.number("alpha");
    if (!(alpha > 0 && alpha <= 1)) r.fail("alpha", `must be in (0, 1], got ${alpha}`);
    const policy = r.oneOf("nonFinite", ["refuse", "skip"] as const);
    const count = r.integer("count", 0, Number.MAX_SAFE_INTEGER);
    const skipped = r.integer("skipped", 0, Number.MAX_SAFE_INTEGER);
    // W = Σ λ^k over the samples seen: 0 before the first, then in [1, 1/α].
    const weight = r.numberIn("weight", 0, (1 / alpha) * (1 + 1e-9));
    // samples lie in ±L, so does their mean, and S ≤ (2L)²·W (slack for rounding)
    const L = SAMPLE_LIMIT;
    const mean = r.numberIn("mean", -L, L);
    const s = r.numberIn("s", 0, 5 * L * L * Math.max(weight, 1));
    if ((count === 0) !== (weight === 0) || (count > 0 && weight < 1)) {
      throw new SnapshotError(EwMoments.kind, "state.weight", `must be 0 before the first sample and at least 1 after it, got ${weight} for count ${count}`);
    }
    const ew = new EwMoments({ alpha, nonFinite: policy });
    ew.#count = count;
    ew.#skipped = skipped;
    ew.#weight = weight;
    ew.#r = weight === 0 ? 0 : 1 / weight;
    ew.#mean = mean;
    ew.#s = s;
    return ew;
  }
}
