import {
  envelope,
  finiteNumber,
  nonFiniteOption,
  NonFiniteError,
  nonNegativeInteger,
  nonNegativeNumber,
  numberInRange,
  openSnapshot,
  optionsObject,
  positiveNumber,
  type NonFinitePolicy,
  type Snapshot,
} from "@leeway/core";
import type { ChangeDirection, ChangeReading, ChangeSides, ChangeTest } from "./change-test.js";
import { scanStart, sidesOption, warningFractionOption } from "./options.js";
import { buildFromSnapshot, definedOnly } from "./restore-support.js";

/** Options of {@link PageHinkley}. */
export interface PageHinkleyOptions {
  /** Alarm threshold λ, in score units (> 0). */
  threshold: number;
  /** Magnitude tolerance δ, in score units (default 0): deviations smaller than δ do not accumulate. */
  delta?: number;
  /** `"up"` (default: scores rising), `"down"` or `"both"`. */
  direction?: ChangeSides;
  /** Forgetting factor α in (0, 1] of the running mean (default 1: the plain mean of all samples). */
  forgetting?: number;
  /** A known in-control mean μ₀; when given, it replaces the running mean. */
  mean?: number;
  /** No alarm before this many finite samples (default 30). */
  minSamples?: number;
  /** `"warning"` once the statistic passes this fraction of λ (default 0.5). */
  warningFraction?: number;
  /** `"refuse"` (default) or `"skip"` non-finite samples. */
  nonFinite?: NonFinitePolicy;
}

/** Plain state of a {@link PageHinkley} snapshot. */
export interface PageHinkleyState {
  threshold: number;
  delta: number;
  direction: ChangeSides;
  forgetting: number;
  knownMean: number | null;
  minSamples: number;
  warningFraction: number;
  nonFinite: NonFinitePolicy;
  weight: number;
  runningMean: number;
  upper: number;
  lower: number;
  upperZero: number;
  lowerZero: number;
  count: number;
  skipped: number;
}

const NAME = "PageHinkley";
const KNOWN = ["threshold", "delta", "direction", "forgetting", "mean", "minSamples", "warningFraction", "nonFinite"] as const;

/**
 * The Page-Hinkley test (Page, 1954; Hinkley, 1971; Basseville & Nikiforov, 1993, §2.2) for a change in
 * the mean of a score stream. With x̄ₜ the running mean through sample t (optionally exponentially
 * forgetting: Wₜ = α·Wₜ₋₁ + 1, x̄ₜ = x̄ₜ₋₁ + (xₜ − x̄ₜ₋₁)/Wₜ) and δ the magnitude tolerance,
 *
 *   mₜ = Σ_{s≤t} (xₛ − x̄ₛ − δ),  PHₜ = mₜ − min_{0≤s≤t} mₛ  (m₀ = 0),  alarm when PHₜ > λ,
 *
 * computed by the equivalent recursion PHₜ = max(0, PHₜ₋₁ + xₜ − x̄ₜ − δ) (the decrease side mirrors it
 * with x̄ₜ − xₜ − δ). With a known mean μ₀ in place of x̄ₜ this is exactly the one-sided CUSUM with k = δ.
 * `restart()` zeroes the sums and keeps the running mean.
 * @example
 * const ph = new PageHinkley({ threshold: 3, mean: 0, minSamples: 0 });
 * ph.scan(new Float64Array([0, 0, 1, 1, 1, 1])); // 5 (the sum passes 3 at the fourth 1)
 */
export class PageHinkley implements ChangeTest {
  static readonly kind = "leeway.change.page-hinkley";
  static readonly version = 1;
  readonly name = NAME;
  readonly #threshold: number; // λ
  readonly #delta: number; // δ
  readonly #direction: ChangeSides;
  readonly #lambdaUp: number; // λ for a watched upper side, +∞ otherwise
  readonly #lambdaDown: number;
  readonly #forgetting: number; // α
  readonly #knownMean: number | null; // μ₀
  readonly #minSamples: number;
  readonly #warningFraction: number;
  readonly #nonFinite: NonFinitePolicy;
  #weight = 0; // Wₜ, the effective number of samples in the running mean
  #runningMean = 0; // x̄ₜ
  #upper = 0;
  #lower = 0;
  #upperZero = -1;
  #lowerZero = -1;
  #count = 0;
  #skipped = 0;

  constructor(options: PageHinkleyOptions) {
    const o = optionsObject<PageHinkleyOptions>(NAME, options, KNOWN);
    this.#threshold = positiveNumber(NAME, "threshold", o.threshold);
    this.#delta = o.delta === undefined ? 0 : nonNegativeNumber(NAME, "delta", o.delta);
    this.#direction = sidesOption(NAME, o.direction, "up");
    this.#lambdaUp = this.#direction === "down" ? Infinity : this.#threshold;
    this.#lambdaDown = this.#direction === "up" ? Infinity : this.#threshold;
    this.#forgetting = o.forgetting === undefined ? 1 : numberInRange(NAME, "forgetting", o.forgetting, { min: 0, max: 1, minExclusive: true });
    this.#knownMean = o.mean === undefined ? null : finiteNumber(NAME, "mean", o.mean);
    this.#minSamples = o.minSamples === undefined ? 30 : nonNegativeInteger(NAME, "minSamples", o.minSamples);
    this.#warningFraction = warningFractionOption(NAME, o.warningFraction);
    this.#nonFinite = nonFiniteOption(NAME, o.nonFinite);
  }

  /** The threshold λ, in score units. */
  get threshold(): number {
    return this.#threshold;
  }
  /** The increase statistic PHₜ. */
  get upper(): number {
    return this.#upper;
  }
  /** The decrease statistic. */
  get lower(): number {
    return this.#lower;
  }
  /** The mean in use: μ₀ when known, else the running mean x̄ₜ. */
  get mean(): number {
    return this.#knownMean ?? this.#runningMean;
  }
  /** Finite samples taken. */
  get count(): number {
    return this.#count;
  }
  /** Non-finite samples skipped. */
  get skipped(): number {
    return this.#skipped;
  }

  observe(x: number): ChangeReading {
    const i = this.#count + this.#skipped;
    if (!(x - x === 0)) {
      if (this.#nonFinite === "refuse") throw new NonFiniteError(NAME, "x", x);
      this.#skipped += 1;
      return this.#reading(i);
    }
    this.#count += 1;
    const w = this.#forgetting * this.#weight + 1;
    const r = 1 / w;
    this.#weight = w;
    const runMean = this.#runningMean + (x - this.#runningMean) * r;
    this.#runningMean = runMean;
    const d = x - (this.#knownMean === null ? runMean : this.#knownMean);
    let up = this.#upper + (d - this.#delta);
    let lo = this.#lower + (-d - this.#delta);
    if (up <= 0) {
      up = 0;
      this.#upperZero = i;
    }
    if (lo <= 0) {
      lo = 0;
      this.#lowerZero = i;
    }
    this.#upper = up;
    this.#lower = lo;
    return this.#reading(i);
  }

  scan(xs: Float64Array, from = 0): number {
    let j = scanStart(NAME, xs, from);
    const n = xs.length;
    const alpha = this.#forgetting;
    const delta = this.#delta;
    const lamUp = this.#lambdaUp;
    const lamDown = this.#lambdaDown;
    const minSamples = this.#minSamples;
    const known = this.#knownMean !== null;
    const mu0 = this.#knownMean ?? 0;
    const refuse = this.#nonFinite === "refuse";
    let w = this.#weight;
    let runMean = this.#runningMean;
    let up = this.#upper;
    let lo = this.#lower;
    let uz = this.#upperZero;
    let lz = this.#lowerZero;
    let count = this.#count;
    let skipped = this.#skipped;
    let idx = count + skipped; // stream index of xs[j]
    let found = -1;
    for (; j < n; j++, idx++) {
      const x = xs[j] as number;
      if (!(x - x === 0)) {
        if (refuse) break;
        skipped++;
        continue;
      }
      count++;
      // Wₜ and 1/Wₜ depend on no sample: the division stays off the running mean's chain.
      w = alpha * w + 1;
      const r = 1 / w;
      runMean = runMean + (x - runMean) * r;
      const d = x - (known ? mu0 : runMean);
      up = up + (d - delta);
      lo = lo + (-d - delta);
      if (up <= 0) {
        up = 0;
        uz = idx;
      }
      if (lo <= 0) {
        lo = 0;
        lz = idx;
      }
      if ((up > lamUp || lo > lamDown) && count >= minSamples) {
        found = j;
        break;
      }
    }
    this.#weight = w;
    this.#runningMean = runMean;
    this.#upper = up;
    this.#lower = lo;
    this.#upperZero = uz;
    this.#lowerZero = lz;
    this.#count = count;
    this.#skipped = skipped;
    if (j < n && found < 0) throw new NonFiniteError(NAME, `xs[${j}]`, xs[j]);
    return found;
  }

  restart(): void {
    const i = this.#count + this.#skipped;
    this.#upper = 0;
    this.#lower = 0;
    this.#upperZero = i - 1;
    this.#lowerZero = i - 1;
  }

  snapshot(): Snapshot<PageHinkleyState> {
    return envelope(PageHinkley.kind, PageHinkley.version, {
      threshold: this.#threshold,
      delta: this.#delta,
      direction: this.#direction,
      forgetting: this.#forgetting,
      knownMean: this.#knownMean,
      minSamples: this.#minSamples,
      warningFraction: this.#warningFraction,
      nonFinite: this.#nonFinite,
      weight: this.#weight,
      runningMean: this.#runningMean,
      upper: this.#upper,
      lower: this.#lower,
      upperZero: this.#upperZero,
      lowerZero: this.#lowerZero,
      count: this.#count,
      skipped: this.#skipped,
    });
  }

  /** Rebuilds a PageHinkley from {@link PageHinkley.snapshot}; it continues exactly where the original was. */
  static restore(snapshot: unknown): PageHinkley {
    const r = openSnapshot(snapshot, PageHinkley.kind, PageHinkley.version);
    const threshold = r.number("threshold");
    const delta = r.number("delta");
    const direction = r.oneOf("direction", ["up", "down", "both"] as const);
    const forgetting = r.number("forgetting");
    const knownMean = r.numberOrNull("knownMean");
    const minSamples = r.integer("minSamples", 0, 2 ** 31 - 1);
    const warningFraction = r.number("warningFraction");
    const nonFinite = r.oneOf("nonFinite", ["refuse", "skip"] as const);
    const count = r.integer("count", 0, Number.MAX_SAFE_INTEGER);
    const skipped = r.integer("skipped", 0, Number.MAX_SAFE_INTEGER);
    const last = count + skipped - 1;
    const weight = r.numberIn("weight", 0, Math.max(count, 0));
    const runningMean = r.number("runningMean");
    const upper = r.numberIn("upper", 0, Number.MAX_VALUE);
    const lower = r.numberIn("lower", 0, Number.MAX_VALUE);
    const upperZero = r.integer("upperZero", -1, last);
    const lowerZero = r.integer("lowerZero", -1, last);
    if ((count === 0) !== (weight === 0)) r.fail("weight", "must be 0 exactly when no sample was taken");
    const test = buildFromSnapshot(PageHinkley.kind, () =>
      new PageHinkley(definedOnly<PageHinkleyOptions>({
        threshold, delta, direction, forgetting, minSamples, warningFraction, nonFinite,
        mean: knownMean ?? undefined,
      })),
    );
    test.#weight = weight;
    test.#runningMean = runningMean;
    test.#upper = upper;
    test.#lower = lower;
    test.#upperZero = upperZero;
    test.#lowerZero = lowerZero;
    test.#count = count;
    test.#skipped = skipped;
    return test;
  }

  #reading(i: number): ChangeReading {
    const up = this.#direction !== "down" ? this.#upper : 0;
    const lo = this.#direction !== "up" ? this.#lower : 0;
    const statistic = up >= lo ? up : lo;
    const armed = this.#count >= this.#minSamples;
    const change = armed && (this.#upper > this.#lambdaUp || this.#lower > this.#lambdaDown);
    const status = change ? "change" : statistic > this.#warningFraction * this.#threshold ? "warning" : "stable";
    const reading: ChangeReading = { index: i, status, statistic, threshold: this.#threshold, skipped: this.#skipped };
    if (statistic > 0) {
      const direction: ChangeDirection = up >= lo ? "up" : "down";
      reading.direction = direction;
      reading.onset = (direction === "up" ? this.#upperZero : this.#lowerZero) + 1;
    }
    return reading;
  }
}
