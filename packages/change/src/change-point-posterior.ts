import {
  envelope,
  finiteNumber,
  integerInRange,
  nonFiniteOption,
  NonFiniteError,
  numberInRange,
  oneOf,
  openSnapshot,
  optionsObject,
  OptionError,
  positiveNumber,
  requireNumber,
  SampleError,
  type NonFinitePolicy,
  type Snapshot,
} from "@leeway/core";
import { requireBatch } from "@leeway/stats";
import { logGamma } from "./log-gamma.js";
import { buildFromSnapshot, definedOnly } from "./restore-support.js";

/** The most run-length hypotheses a {@link ChangePointPosterior} may keep. */
export const POSTERIOR_MAX_HYPOTHESES = 4096;

/** Options of {@link ChangePointPosterior}. Give `mean` and `sigma` of the prior, or `burnIn` to estimate them. */
export interface ChangePointPosteriorOptions {
  /** λ: the expected segment length in samples (> 1, default 1000); the hazard of a change is 1/λ per sample. */
  expectedRunLength?: number;
  /** `"log"` (default): model ln(x + offset), for positive scores; `"linear"`: model x itself. */
  scale?: "log" | "linear";
  /** Added to each sample before the log (≥ 0, default 0); a sample with x + offset ≤ 0 is non-finite on the log scale. */
  offset?: number;
  /** μ₀: prior mean of a segment's level, on the modelled scale (|μ₀| ≤ 1e100, the range of modelled values). */
  mean?: number;
  /** σ₀: prior guess of the noise's standard deviation within a segment, on the modelled scale (in [1e-50, 2e100]); β₀ = α₀σ₀². */
  sigma?: number;
  /** Estimate μ₀ and σ₀ from the first `burnIn` samples (an integer in [2, 4096], default 50 when mean and sigma are not given). */
  burnIn?: number;
  /** κ₀: the prior mean is worth this many samples (in [1e-6, 1e6], default 1). */
  meanWeight?: number;
  /** α₀: shape of the prior on the noise precision (in [1e-3, 1e6], default 1). */
  shape?: number;
  /** k: `changeProbability` is the posterior probability that the current segment began within the last k samples (default 10). */
  recent?: number;
  /** At most this many run-length hypotheses are kept (an integer in [2, 4096], default 256): the lowest-probability ones go. */
  maxHypotheses?: number;
  /** Hypotheses whose posterior probability falls below this are dropped (in [0, 1e−3], default 1e−12). */
  pruneBelow?: number;
  /** `"refuse"` (default) or `"skip"` non-finite samples (on the modelled scale). A modelled value beyond ±1e100 is refused (`E_SAMPLE`). */
  nonFinite?: NonFinitePolicy;
}

/** What {@link ChangePointPosterior.observe} returns. */
export interface ChangePointReading {
  /** Stream position of the sample (skipped ones count), from 0. */
  index: number;
  /** P(the current segment began within the last k samples | data); 0 during the burn-in. */
  changeProbability: number;
  /** The most probable length of the current segment, in samples (the sample itself included); 0 during the burn-in. */
  runLength: number;
  /** The most probable stream index at which the current segment began (index − runLength + 1); undefined during the burn-in. */
  onset: number | undefined;
  /** The posterior mean level of the current segment under the most probable run length, on the sample's scale (e^μ − offset on the log scale). */
  level: number | undefined;
  /** Run-length hypotheses kept after this sample. */
  hypotheses: number;
  skipped: number;
}

/** Plain state of a {@link ChangePointPosterior} snapshot. */
export interface ChangePointPosteriorState {
  expectedRunLength: number;
  scale: "log" | "linear";
  offset: number;
  meanWeight: number;
  shape: number;
  recent: number;
  maxHypotheses: number;
  pruneBelow: number;
  nonFinite: NonFinitePolicy;
  burnInLength: number;
  /** The burn-in's modelled values while it runs; null once the prior is set. */
  burnIn: number[] | null;
  priorMean: number | null;
  priorSigma: number | null;
  /** Per hypothesis: its run length, posterior mean μ, rate β, probability and ln Γ(α + ½) − ln Γ(α). */
  lengths: number[];
  means: number[];
  rates: number[];
  weights: number[];
  gammaRatios: number[];
  count: number;
  skipped: number;
}

const NAME = "ChangePointPosterior";
const KNOWN = ["expectedRunLength", "scale", "offset", "mean", "sigma", "burnIn", "meanWeight", "shape", "recent", "maxHypotheses", "pruneBelow", "nonFinite"] as const;
const HALF_LOG_PI = 0.5 * Math.log(Math.PI);
const LINEAR_LIMIT = 1e100; // the largest |modelled value| taken: its square stays far from overflow
// Prior ranges that keep every step finite for modelled values within ±LINEAR_LIMIT: β₀ = α₀σ₀² stays
// in [1e-103, 4e206], so (y − μ)²/(νs²) ≤ 4e200/2e-103 and the rates, after any number of samples,
// stay below 1e220; a burn-in's spread is clamped into the same σ₀ range.
const SIGMA_RANGE = { min: 1e-50, max: 2e100 };
const MEAN_WEIGHT_RANGE = { min: 1e-6, max: 1e6 };
const SHAPE_RANGE = { min: 1e-3, max: 1e6 };
const RATE_LIMIT = 1e250; // above what the rates can reach (restore refuses more)
const GAMMA_RATIO_LIMIT = 100; // |ln Γ(α + ½) − ln Γ(α)| for α in [1e-3, 1e16] is below 20

/**
 * Bayesian online change-point detection (Adams & MacKay, 2007): the posterior distribution of the
 * current segment's length ("run length") after every sample, for a stream made of segments with
 * their own level and noise.
 *
 * Model: a new segment begins before each sample with probability H = 1/λ; within a segment the
 * modelled values y (ln(x + offset) by default, so that multiplicative changes of a score are
 * shifts) are normal with a level and precision drawn from the conjugate Normal-Gamma prior
 * (μ₀, κ₀, α₀, β₀ = α₀σ₀²). For each run-length hypothesis the predictive density of the next y is
 * Student-t with 2α degrees of freedom, location μ and scale² β(κ + 1)/(ακ); the posterior updates as
 * κ′ = κ + 1, μ′ = (κμ + y)/κ′, α′ = α + ½, β′ = β + κ(y − μ)²/(2κ′) (Murphy, 2007, §3). Each
 * hypothesis grows by one with weight × (1 − H) × its predictive density of y; a run length of 1
 * gets H × the prior's predictive density of y (a segment's first sample is judged by the prior:
 * the convention of product-partition models, one step apart from the paper's), and the
 * posterior is normalised. Memory stays bounded: hypotheses under `pruneBelow` are dropped, then the least
 * probable beyond `maxHypotheses` (Adams & MacKay suggest this pruning). Cost O(hypotheses) per sample.
 *
 * The reading gives the probability that the current segment began within the last k samples
 * (evidence of a recent change beside a change test's statistic) and the most probable onset.
 * @example
 * const post = new ChangePointPosterior({ scale: "linear", mean: 0, sigma: 1, expectedRunLength: 100 });
 * const xs = Float64Array.from({ length: 80 }, (_, i) => (i < 50 ? 0 : 4) + 0.3 * Math.sin(i * 1.7));
 * let last; for (const x of xs) last = post.observe(x);
 * [last.onset, last.level.toFixed(1)]; // [50, "3.9"] (the prior mean 0 is worth one sample)
 */
export class ChangePointPosterior {
  static readonly kind = "leeway.change.change-point-posterior";
  static readonly version = 1;
  readonly #expectedRunLength: number; // λ
  readonly #hazard: number; // H = 1/λ
  readonly #logScale: boolean;
  readonly #offset: number;
  readonly #meanWeight: number; // κ₀
  readonly #shape: number; // α₀
  readonly #recent: number; // k
  readonly #max: number;
  readonly #pruneBelow: number;
  readonly #nonFinite: NonFinitePolicy;
  readonly #burnInLength: number; // 0 when the prior was given
  #burnIn: number[] | null;
  #priorMean = 0; // μ₀
  #priorRate = 0; // β₀
  #priorGammaRatio = 0; // ln Γ(α₀ + ½) − ln Γ(α₀)
  // hypotheses, in order of increasing run length
  #size = 0;
  #lengths: Float64Array;
  #means: Float64Array;
  #rates: Float64Array;
  #weights: Float64Array;
  #gammaRatios: Float64Array;
  // scratch for the next step (one more than the maximum)
  #next: { lengths: Float64Array; means: Float64Array; rates: Float64Array; weights: Float64Array; gammaRatios: Float64Array };
  #count = 0;
  #skipped = 0;

  constructor(options: ChangePointPosteriorOptions = {}) {
    const o = optionsObject<ChangePointPosteriorOptions>(NAME, options, KNOWN);
    this.#expectedRunLength = o.expectedRunLength === undefined ? 1000 : numberInRange(NAME, "expectedRunLength", o.expectedRunLength, { min: 1, max: 1e15, minExclusive: true });
    this.#hazard = 1 / this.#expectedRunLength;
    this.#logScale = (o.scale === undefined ? "log" : oneOf(NAME, "scale", o.scale, ["log", "linear"] as const)) === "log";
    this.#offset = o.offset === undefined ? 0 : numberInRange(NAME, "offset", o.offset, { min: 0, max: Number.MAX_VALUE });
    this.#meanWeight = o.meanWeight === undefined ? 1 : numberInRange(NAME, "meanWeight", o.meanWeight, MEAN_WEIGHT_RANGE);
    this.#shape = o.shape === undefined ? 1 : numberInRange(NAME, "shape", o.shape, SHAPE_RANGE);
    this.#recent = o.recent === undefined ? 10 : integerInRange(NAME, "recent", o.recent, 1, 2 ** 31 - 1);
    this.#max = o.maxHypotheses === undefined ? 256 : integerInRange(NAME, "maxHypotheses", o.maxHypotheses, 2, POSTERIOR_MAX_HYPOTHESES);
    this.#pruneBelow = o.pruneBelow === undefined ? 1e-12 : numberInRange(NAME, "pruneBelow", o.pruneBelow, { min: 0, max: 1e-3 });
    this.#nonFinite = nonFiniteOption(NAME, o.nonFinite);
    const given = o.mean !== undefined || o.sigma !== undefined;
    if (given) {
      if (o.burnIn !== undefined) throw new OptionError(NAME, "burnIn", o.burnIn, "left out when mean and sigma are given");
      const mean = numberInRange(NAME, "mean", o.mean, { min: -LINEAR_LIMIT, max: LINEAR_LIMIT });
      const sigma = numberInRange(NAME, "sigma", o.sigma, SIGMA_RANGE);
      this.#burnInLength = 0;
      this.#burnIn = null;
      this.#setPrior(mean, sigma);
    } else {
      this.#burnInLength = o.burnIn === undefined ? 50 : integerInRange(NAME, "burnIn", o.burnIn, 2, 4096);
      this.#burnIn = [];
    }
    const cap = this.#max + 1;
    this.#lengths = new Float64Array(cap);
    this.#means = new Float64Array(cap);
    this.#rates = new Float64Array(cap);
    this.#weights = new Float64Array(cap);
    this.#gammaRatios = new Float64Array(cap);
    this.#next = { lengths: new Float64Array(cap), means: new Float64Array(cap), rates: new Float64Array(cap), weights: new Float64Array(cap), gammaRatios: new Float64Array(cap) };
  }

  /** Finite samples taken. */
  get count(): number {
    return this.#count;
  }
  /** Non-finite samples skipped. */
  get skipped(): number {
    return this.#skipped;
  }
  /** Run-length hypotheses kept. */
  get hypotheses(): number {
    return this.#size;
  }

  /**
   * The posterior over the current segment's length as plain arrays (run lengths ascending, their
   * probabilities summing to 1); empty during the burn-in.
   */
  runLengths(): { lengths: number[]; probabilities: number[] } {
    return { lengths: Array.from(this.#lengths.subarray(0, this.#size)), probabilities: Array.from(this.#weights.subarray(0, this.#size)) };
  }

  /** Takes one sample; returns the change probability, the most probable onset and the segment's level. */
  observe(x: number): ChangePointReading {
    requireNumber(NAME, "x", x);
    const index = this.#count + this.#skipped;
    const y = this.#logScale ? Math.log(x + this.#offset) : x;
    if (!(y - y === 0) || !(x - x === 0)) {
      if (this.#nonFinite === "refuse") throw new NonFiniteError(NAME, "x", x);
      this.#skipped += 1;
      return this.#reading(index);
    }
    // (y − μ)² must stay finite in the posterior's rates
    if (!(Math.abs(y) <= LINEAR_LIMIT)) throw new SampleError(NAME, "x", x, `a number whose modelled value is in [${-LINEAR_LIMIT}, ${LINEAR_LIMIT}]`);
    this.#count += 1;
    const burnIn = this.#burnIn;
    if (burnIn !== null) {
      burnIn.push(y);
      if (burnIn.length >= this.#burnInLength) this.#finishBurnIn(burnIn);
      return this.#reading(index);
    }
    this.#update(y);
    return this.#reading(index);
  }

  /** Takes every sample of `xs`; the same state as `observe` on each. */
  observeMany(xs: Float64Array): void {
    requireBatch(NAME, xs);
    for (let i = 0; i < xs.length; i++) this.observe(xs[i] as number);
  }

  /** The whole state as JSON-safe data. */
  snapshot(): Snapshot<ChangePointPosteriorState> {
    const n = this.#size;
    const ready = this.#burnIn === null;
    return envelope(ChangePointPosterior.kind, ChangePointPosterior.version, {
      expectedRunLength: this.#expectedRunLength,
      scale: this.#logScale ? "log" : "linear",
      offset: this.#offset,
      meanWeight: this.#meanWeight,
      shape: this.#shape,
      recent: this.#recent,
      maxHypotheses: this.#max,
      pruneBelow: this.#pruneBelow,
      nonFinite: this.#nonFinite,
      burnInLength: this.#burnInLength,
      burnIn: this.#burnIn === null ? null : [...this.#burnIn],
      priorMean: ready ? this.#priorMean : null,
      priorSigma: ready ? Math.sqrt(this.#priorRate / this.#shape) : null,
      lengths: Array.from(this.#lengths.subarray(0, n)),
      means: Array.from(this.#means.subarray(0, n)),
      rates: Array.from(this.#rates.subarray(0, n)),
      weights: Array.from(this.#weights.subarray(0, n)),
      gammaRatios: Array.from(this.#gammaRatios.subarray(0, n)),
      count: this.#count,
      skipped: this.#skipped,
    });
  }

  /** Rebuilds a posterior from {@link ChangePointPosterior.snapshot}; it continues exactly like the original. */
  static restore(snapshot: unknown): ChangePointPosterior {
    const r = openSnapshot(snapshot, ChangePointPosterior.kind, ChangePointPosterior.version);
    const expectedRunLength = r.number("expectedRunLength");
    const scale = r.oneOf("scale", ["log", "linear"] as const);
    const offset = r.number("offset");
    const meanWeight = r.number("meanWeight");
    const shape = r.number("shape");
    const recent = r.integer("recent", 1, 2 ** 31 - 1);
    const maxHypotheses = r.integer("maxHypotheses", 2, POSTERIOR_MAX_HYPOTHESES);
    const pruneBelow = r.number("pruneBelow");
    const nonFinite = r.oneOf("nonFinite", ["refuse", "skip"] as const);
    const count = r.integer("count", 0, Number.MAX_SAFE_INTEGER);
    const skipped = r.integer("skipped", 0, Number.MAX_SAFE_INTEGER);
    const burnInLength = r.integer("burnInLength", 0, 4096);
    const burnInRaw = r.raw("burnIn");
    const burnIn = burnInRaw === null ? null : Array.from(r.numbers("burnIn", { max: Math.max(0, burnInLength - 1) }));
    if (burnIn !== null && burnIn.length !== count) r.fail("burnIn", `must hold the ${count} samples taken so far`);
    if (burnIn !== null && burnInLength === 0) r.fail("burnIn", "must be null when the prior was given");
    const priorMean = r.numberOrNull("priorMean");
    const priorSigma = r.numberOrNull("priorSigma");
    if ((burnIn === null) !== (priorMean !== null && priorSigma !== null)) r.fail("priorMean", "must be set exactly when no burn-in is running");
    if (priorSigma !== null && !(priorSigma >= SIGMA_RANGE.min && priorSigma <= SIGMA_RANGE.max)) r.fail("priorSigma", `must be in [${SIGMA_RANGE.min}, ${SIGMA_RANGE.max}], got ${priorSigma}`);
    if (priorMean !== null && !(Math.abs(priorMean) <= LINEAR_LIMIT)) r.fail("priorMean", `must be in [${-LINEAR_LIMIT}, ${LINEAR_LIMIT}], got ${priorMean}`);
    burnIn?.forEach((y, i) => {
      if (!(Math.abs(y) <= LINEAR_LIMIT)) r.fail(`burnIn[${i}]`, `must be a modelled value in [${-LINEAR_LIMIT}, ${LINEAR_LIMIT}], got ${y}`);
    });
    const lengths = r.numbers("lengths", { max: maxHypotheses });
    const n = lengths.length;
    const means = r.numbers("means", n);
    const rates = r.numbers("rates", n);
    const weights = r.numbers("weights", n);
    const gammaRatios = r.numbers("gammaRatios", n);
    if (burnIn !== null && n !== 0) r.fail("lengths", "must be empty during the burn-in");
    if (burnIn === null && count > 0 && n === 0) r.fail("lengths", "must hold at least one hypothesis once samples were taken");
    let sum = 0;
    for (let i = 0; i < n; i++) {
      const len = lengths[i] as number;
      if (!Number.isInteger(len) || len < 1 || len > count || (i > 0 && len <= (lengths[i - 1] as number))) r.fail(`lengths[${i}]`, "must be increasing integers in [1, count]");
      if (!((rates[i] as number) > 0 && (rates[i] as number) <= RATE_LIMIT)) r.fail(`rates[${i}]`, `must be in (0, ${RATE_LIMIT}]`);
      if (!(Math.abs(means[i] as number) <= LINEAR_LIMIT)) r.fail(`means[${i}]`, `must be in [${-LINEAR_LIMIT}, ${LINEAR_LIMIT}]`);
      if (!(Math.abs(gammaRatios[i] as number) <= GAMMA_RATIO_LIMIT)) r.fail(`gammaRatios[${i}]`, `must be in [${-GAMMA_RATIO_LIMIT}, ${GAMMA_RATIO_LIMIT}]`);
      if (!((weights[i] as number) >= 0)) r.fail(`weights[${i}]`, "must be ≥ 0");
      sum += weights[i] as number;
    }
    if (n > 0 && Math.abs(sum - 1) > 1e-9) r.fail("weights", `must sum to 1, got ${sum}`);
    const post = buildFromSnapshot(ChangePointPosterior.kind, () =>
      new ChangePointPosterior(definedOnly<ChangePointPosteriorOptions>({
        expectedRunLength, scale, offset, meanWeight, shape, recent, maxHypotheses, pruneBelow, nonFinite,
        mean: burnInLength === 0 ? (priorMean as number) : undefined,
        sigma: burnInLength === 0 ? (priorSigma as number) : undefined,
        burnIn: burnInLength === 0 ? undefined : burnInLength,
      })),
    );
    if (burnInLength > 0) {
      post.#burnIn = burnIn;
      if (burnIn === null) post.#setPrior(priorMean as number, priorSigma as number);
    }
    post.#size = n;
    post.#lengths.set(lengths);
    post.#means.set(means);
    post.#rates.set(rates);
    post.#weights.set(weights);
    post.#gammaRatios.set(gammaRatios);
    post.#count = count;
    post.#skipped = skipped;
    return post;
  }

  #setPrior(mean: number, sigma: number): void {
    this.#priorMean = mean;
    this.#priorRate = this.#shape * sigma * sigma;
    this.#priorGammaRatio = logGamma(this.#shape + 0.5) - logGamma(this.#shape);
  }

  /** Sets the prior from the burn-in's mean and standard deviation, then runs its samples through the model. */
  #finishBurnIn(values: number[]): void {
    let mean = 0;
    for (const v of values) mean += v / values.length;
    let ss = 0;
    for (const v of values) ss += (v - mean) * (v - mean);
    const sd = Math.sqrt(ss / (values.length - 1));
    const spread = sd > 0 ? sd : Math.max(Math.abs(mean) * 1e-6, 1e-12);
    this.#setPrior(mean, Math.min(Math.max(spread, SIGMA_RANGE.min), SIGMA_RANGE.max));
    this.#burnIn = null;
    for (const v of values) this.#update(v);
  }

  /** One step of the run-length recursion with the modelled value y. */
  #update(y: number): void {
    const n = this.#size;
    const H = this.#hazard;
    const k0 = this.#meanWeight;
    const a0 = this.#shape;
    const lengths = this.#lengths;
    const means = this.#means;
    const rates = this.#rates;
    const weights = this.#weights;
    const ratios = this.#gammaRatios;
    const next = this.#next;
    // ln of the Student-t predictive density of y under each hypothesis, and under the prior (a new segment)
    const logPrior = logStudent(y, this.#priorMean, k0, a0, this.#priorRate, this.#priorGammaRatio);
    let top = logPrior;
    for (let i = 0; i < n; i++) {
      const len = lengths[i] as number;
      const lp = logStudent(y, means[i] as number, k0 + len, a0 + 0.5 * len, rates[i] as number, ratios[i] as number);
      next.weights[i + 1] = lp; // held as a log for now
      if (lp > top) top = lp;
    }
    // growth (i → i + 1) and change (→ slot 0), scaled by e^{−top}
    let total = 0;
    for (let i = 0; i < n; i++) {
      const grow = (weights[i] as number) * Math.exp((next.weights[i + 1] as number) - top) * (1 - H);
      next.weights[i + 1] = grow;
      total += grow;
      const len = lengths[i] as number;
      const kappa = k0 + len;
      const mu = means[i] as number;
      const d = y - mu;
      next.lengths[i + 1] = len + 1;
      next.means[i + 1] = (kappa * mu + y) / (kappa + 1);
      next.rates[i + 1] = (rates[i] as number) + (kappa * d * d) / (2 * (kappa + 1));
      // ln Γ(α + 1) − ln Γ(α + ½) = ln α − (ln Γ(α + ½) − ln Γ(α))
      next.gammaRatios[i + 1] = Math.log(a0 + 0.5 * len) - (ratios[i] as number);
    }
    // a new segment begins before y (the old weights sum to 1) and y is judged by the prior
    const first = Math.exp(logPrior - top) * (n === 0 ? 1 : H);
    next.weights[0] = first;
    total += first;
    const d0 = y - this.#priorMean;
    next.lengths[0] = 1;
    next.means[0] = (k0 * this.#priorMean + y) / (k0 + 1);
    next.rates[0] = this.#priorRate + (k0 * d0 * d0) / (2 * (k0 + 1));
    next.gammaRatios[0] = Math.log(a0) - this.#priorGammaRatio;
    // normalise, prune, and copy back in order of increasing run length
    const floor = this.#pruneBelow;
    let kept = 0;
    let weakest = -1; // the least probable hypothesis above the floor
    for (let i = 0; i <= n; i++) {
      const w = (next.weights[i] as number) / total;
      next.weights[i] = w;
      if (w < floor) continue;
      kept++;
      if (weakest < 0 || w < (next.weights[weakest] as number)) weakest = i;
    }
    // one hypothesis is added per sample, so at most one is over the cap: the least probable goes
    const drop = kept > this.#max ? weakest : -1;
    let keptMass = 0;
    let j = 0;
    for (let i = 0; i <= n; i++) {
      const w = next.weights[i] as number;
      if (w < floor || i === drop) continue;
      lengths[j] = next.lengths[i] as number;
      means[j] = next.means[i] as number;
      rates[j] = next.rates[i] as number;
      weights[j] = w;
      ratios[j] = next.gammaRatios[i] as number;
      keptMass += w;
      j++;
    }
    for (let i = 0; i < j; i++) weights[i] = (weights[i] as number) / keptMass;
    this.#size = j;
  }

  #reading(index: number): ChangePointReading {
    const n = this.#size;
    if (n === 0) return { index, changeProbability: 0, runLength: 0, onset: undefined, level: undefined, hypotheses: 0, skipped: this.#skipped };
    let best = 0;
    let recent = 0;
    for (let i = 0; i < n; i++) {
      const w = this.#weights[i] as number;
      if (w > (this.#weights[best] as number)) best = i;
      if ((this.#lengths[i] as number) <= this.#recent) recent += w;
    }
    const runLength = this.#lengths[best] as number;
    const mu = this.#means[best] as number;
    const lastIndex = this.#count + this.#skipped - 1;
    return {
      index,
      changeProbability: Math.min(1, recent),
      runLength,
      onset: lastIndex - runLength + 1,
      level: this.#logScale ? Math.exp(mu) - this.#offset : mu,
      hypotheses: n,
      skipped: this.#skipped,
    };
  }
}

/**
 * ln of the Student-t predictive density of y for Normal-Gamma parameters (μ, κ, α, β):
 * ν = 2α, s² = β(κ + 1)/(ακ); ln p = ln Γ(α + ½) − ln Γ(α) − ½ ln(νπ s²) − (α + ½) ln(1 + (y − μ)²/(ν s²)).
 */
function logStudent(y: number, mu: number, kappa: number, alpha: number, beta: number, gammaRatio: number): number {
  const nuS2 = (2 * beta * (kappa + 1)) / kappa; // ν·s²
  const d = y - mu;
  return gammaRatio - 0.5 * Math.log(nuS2) - HALF_LOG_PI - (alpha + 0.5) * Math.log1p((d * d) / nuS2);
}
