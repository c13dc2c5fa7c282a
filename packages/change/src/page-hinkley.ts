import {
  envelope,
  nonFiniteOption,
  nonNegativeInteger,
  nonNegativeNumber,
  numberInRange,
  openSnapshot,
  optionsObject,
  positiveNumber,
  type NonFinitePolicy,
  type Snapshot,
} from "@leeway/core";
import { acceptSample, MAX_SAMPLE_MAGNITUDE } from "@leeway/stats";
import type { ChangeReading, ChangeSides, ChangeTest } from "./change-test.js";
import { scanStart, sidesOption, warningFractionOption } from "./options.js";
import { buildFromSnapshot, definedOnly, readLevelTestFields } from "./restore-support.js";
import { sumsReading, SumsScratch } from "./sums-reading.js";
import { closeBlock, finishScan, lastZero, openScan, SCAN, SCAN_BLOCK, scanPosition } from "./scan-block.js";

/** Options of {@link PageHinkley}. */
export interface PageHinkleyOptions {
  /** Alarm level λ, in score units (> 0): the statistic must pass it for a `"change"`. */
  alarmLevel: number;
  /** Magnitude tolerance δ, in score units (default 0): deviations smaller than δ do not accumulate. */
  tolerance?: number;
  /** `"up"` (default: scores rising), `"down"` or `"both"`. */
  direction?: ChangeSides;
  /** Forgetting factor α in (0, 1] of the running mean (default 1: the plain mean of all samples). */
  meanForgetting?: number;
  /** A known in-control mean μ₀, in score units; when given, it replaces the running mean. */
  knownMean?: number;
  /** The test is armed (can say `"change"`) from this many finite samples on (default 30). */
  armAfter?: number;
  /** `"warning"` once the statistic passes this fraction of λ (default 0.5). */
  warningFraction?: number;
  /** `"refuse"` (default) or `"skip"` non-finite samples. */
  nonFinite?: NonFinitePolicy;
}

/** Plain state of a {@link PageHinkley} snapshot. */
export interface PageHinkleyState {
  alarmLevel: number;
  tolerance: number;
  direction: ChangeSides;
  meanForgetting: number;
  knownMean: number | null;
  armAfter: number;
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
const KNOWN = ["alarmLevel", "tolerance", "direction", "meanForgetting", "knownMean", "armAfter", "warningFraction", "nonFinite"] as const;

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
 * const ph = new PageHinkley({ alarmLevel: 3, knownMean: 0, armAfter: 0 });
 * ph.scan(new Float64Array([0, 0, 1, 1, 1, 1])); // 5 (the sum passes 3 at the fourth 1)
 */
export class PageHinkley implements ChangeTest {
  static readonly kind = "leeway.change.page-hinkley";
  static readonly version = 2;
  readonly name = NAME;
  readonly #threshold: number; // λ
  readonly #tolerance: number; // δ
  readonly #direction: ChangeSides;
  readonly #lambdaUp: number; // λ for a watched upper side, +∞ otherwise
  readonly #lambdaDown: number;
  readonly #meanForgetting: number; // α
  readonly #knownMean: number | null; // μ₀
  readonly #armAfter: number;
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
  #loop: Float64Array | null = null; // scan's state in and out of pageHinkleyLoop
  #upSums: Float64Array | null = null; // scan's per-block sums, to find the last zero
  #lowSums: Float64Array | null = null;
  readonly #scratch = new SumsScratch(); // observe's reading chooses its side through it

  constructor(options: PageHinkleyOptions) {
    const o = optionsObject<PageHinkleyOptions>(NAME, options, KNOWN);
    this.#threshold = positiveNumber(NAME, "alarmLevel", o.alarmLevel);
    this.#tolerance = o.tolerance === undefined ? 0 : nonNegativeNumber(NAME, "tolerance", o.tolerance);
    this.#direction = sidesOption(NAME, o.direction, "up");
    this.#lambdaUp = this.#direction === "down" ? Infinity : this.#threshold;
    this.#lambdaDown = this.#direction === "up" ? Infinity : this.#threshold;
    this.#meanForgetting = o.meanForgetting === undefined ? 1 : numberInRange(NAME, "meanForgetting", o.meanForgetting, { min: 0, max: 1, minExclusive: true });
    this.#knownMean = o.knownMean === undefined ? null : numberInRange(NAME, "knownMean", o.knownMean, { min: -MAX_SAMPLE_MAGNITUDE, max: MAX_SAMPLE_MAGNITUDE });
    this.#armAfter = o.armAfter === undefined ? 30 : nonNegativeInteger(NAME, "armAfter", o.armAfter);
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
    if (!(typeof x === "number" && Math.abs(x) <= LIMIT)) {
      accept(NAME, "x", this.#nonFinite, x, LIMIT); // throws unless a non-finite number to skip
      this.#skipped += 1;
      return this.#reading(i);
    }
    this.#count += 1;
    const w = this.#meanForgetting * this.#weight + 1;
    const r = 1 / w;
    this.#weight = w;
    const runMean = this.#runningMean + (x - this.#runningMean) * r;
    this.#runningMean = runMean;
    const d = x - (this.#knownMean === null ? runMean : this.#knownMean);
    const upRaw = this.#upper + (d - this.#tolerance);
    const up = (upRaw + Math.abs(upRaw)) * 0.5; // max(0, ·) without a branch
    const loRaw = this.#lower + (-d - this.#tolerance);
    const lo = (loRaw + Math.abs(loRaw)) * 0.5; // max(0, ·) without a branch
    this.#upperZero += (i - this.#upperZero) * +(up === 0);
    this.#lowerZero += (i - this.#lowerZero) * +(lo === 0);
    this.#upper = up;
    this.#lower = lo;
    return this.#reading(i);
  }

  scan(xs: Float64Array, from = 0): number {
    const j = scanStart(NAME, xs, from);
    const s = (this.#loop ??= new Float64Array(LOOP.size));
    openScan(s, this.#count, this.#skipped, this.#nonFinite === "refuse", this.#upperZero, this.#lowerZero);
    s[LOOP.alpha] = this.#meanForgetting;
    s[LOOP.delta] = this.#tolerance;
    s[LOOP.lamUp] = this.#lambdaUp;
    s[LOOP.lamDown] = this.#lambdaDown;
    s[LOOP.armAfter] = this.#armAfter;
    s[LOOP.known] = this.#knownMean === null ? 0 : 1;
    s[LOOP.mu0] = this.#knownMean ?? 0;
    s[LOOP.w] = this.#weight;
    s[LOOP.runMean] = this.#runningMean;
    s[LOOP.up] = this.#upper;
    s[LOOP.lo] = this.#lower;
    const found = pageHinkleyLoop(xs, j, s, (this.#upSums ??= new Float64Array(SCAN_BLOCK)), (this.#lowSums ??= new Float64Array(SCAN_BLOCK)));
    this.#weight = s[LOOP.w] as number;
    this.#runningMean = s[LOOP.runMean] as number;
    this.#upper = s[LOOP.up] as number;
    this.#lower = s[LOOP.lo] as number;
    ({ count: this.#count, skipped: this.#skipped, upperZero: this.#upperZero, lowerZero: this.#lowerZero } = scanPosition(s));
    return finishScan(NAME, xs, s, found);
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
      alarmLevel: this.#threshold,
      tolerance: this.#tolerance,
      direction: this.#direction,
      meanForgetting: this.#meanForgetting,
      knownMean: this.#knownMean,
      armAfter: this.#armAfter,
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
    const alarmLevel = r.number("alarmLevel");
    const tolerance = r.number("tolerance");
    const meanForgetting = r.number("meanForgetting");
    const knownMean = r.numberOrNull("knownMean");
    const armAfter = r.integer("armAfter", 0, 2 ** 31 - 1);
    const { direction, warningFraction, nonFinite, count, skipped, upperZero, lowerZero } = readLevelTestFields(r);
    // W = Σ αᵏ over the samples taken: at most the count, and at most 1/(1 − α) when α < 1 (plus rounding)
    const weight = r.numberIn("weight", 0, Math.min(count, meanForgetting < 1 ? 1 / (1 - meanForgetting) + 1 : Infinity));
    // a weighted mean of accepted samples; each sample moves a sum by at most 2·10¹⁰⁰ + δ
    const runningMean = r.numberIn("runningMean", -MAX_SAMPLE_MAGNITUDE, MAX_SAMPLE_MAGNITUDE);
    const reach = count * (2 * MAX_SAMPLE_MAGNITUDE);
    const upper = r.numberIn("upper", 0, reach);
    const lower = r.numberIn("lower", 0, reach);
    if ((count === 0) !== (weight === 0)) r.fail("weight", "must be 0 exactly when no sample was taken");
    const test = buildFromSnapshot(PageHinkley.kind, () =>
      new PageHinkley(definedOnly<PageHinkleyOptions>({
        alarmLevel, tolerance, direction, meanForgetting, armAfter, warningFraction, nonFinite,
        knownMean: knownMean ?? undefined,
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
    const armed = this.#count >= this.#armAfter;
    const change = armed && (this.#upper > this.#lambdaUp || this.#lower > this.#lambdaDown);
    return makeReading(this.#scratch, i, change, this.#warningFraction * this.#threshold, up, lo, this.#upperZero, this.#lowerZero, this.#threshold, this.#skipped);
  }
}

/** Slots of the state array that {@link pageHinkleyLoop} reads and writes, after the shared ones (see scan-block.ts). */
const LOOP = {
  alpha: SCAN.own, delta: SCAN.own + 1, lamUp: SCAN.own + 2, lamDown: SCAN.own + 3, armAfter: SCAN.own + 4, known: SCAN.own + 5,
  mu0: SCAN.own + 6, w: SCAN.own + 7, runMean: SCAN.own + 8, up: SCAN.own + 9, lo: SCAN.own + 10, size: SCAN.own + 11,
} as const;

// Module-local copies: under the test runner's module loader an imported binding is a getter on a
// module object, which the loop's engine code would call (and not inline) after every block.
const findLastZero = lastZero;
const makeReading = sumsReading;
const endBlock = closeBlock;
const accept = acceptSample;
const LIMIT = MAX_SAMPLE_MAGNITUDE;

/**
 * The hot loop of {@link PageHinkley.scan}, outside the class so that the engine optimizes it as a
 * whole function: the same arithmetic as `observe`, the last zeros found per block (see scan-block.ts).
 * Returns the index of the first alarm or −1; leaves in `s[SCAN.j]` where it stopped.
 */
function pageHinkleyLoop(xs: Float64Array, from: number, s: Float64Array, upSums: Float64Array, lowSums: Float64Array): number {
  const alpha = s[LOOP.alpha] as number;
  const delta = s[LOOP.delta] as number;
  const lamUp = s[LOOP.lamUp] as number;
  const lamDown = s[LOOP.lamDown] as number;
  const armAfter = s[LOOP.armAfter] as number;
  const known = s[LOOP.known] === 1;
  const mu0 = s[LOOP.mu0] as number;
  let w = s[LOOP.w] as number;
  let runMean = s[LOOP.runMean] as number;
  let up = s[LOOP.up] as number;
  let lo = s[LOOP.lo] as number;
  const n = xs.length;
  const block = upSums.length;
  let j = from | 0; // an int32 index: a double here turned every index into a float and boxed it each sample
  let found = -1;
  for (;;) {
    const blockStart = j;
    const end = Math.min(n, j + block);
    // finite samples taken so far, before xs[blockStart]
    const countBefore = (s[SCAN.idx] as number) - (s[SCAN.skipped] as number) - blockStart;
    for (; j < end; j++) {
      const x = xs[j] as number;
      if (!(Math.abs(x) <= LIMIT)) break; // NaN, ±Infinity or beyond the accepted range
      // Wₜ and 1/Wₜ depend on no sample: the division stays off the running mean's chain.
      w = alpha * w + 1;
      const r = 1 / w;
      runMean = runMean + (x - runMean) * r;
      const d = x - (known ? mu0 : runMean);
      const upRaw = up + (d - delta);
      up = (upRaw + Math.abs(upRaw)) * 0.5; // max(0, ·) without a branch
      const loRaw = lo + (-d - delta);
      lo = (loRaw + Math.abs(loRaw)) * 0.5; // max(0, ·) without a branch
      upSums[j - blockStart] = up;
      lowSums[j - blockStart] = lo;
      if ((up > lamUp || lo > lamDown) && countBefore + j + 1 >= armAfter) {
        found = j;
        j++;
        break;
      }
    }
    // The state goes back after every block (see cusum.ts).
    s[LOOP.w] = w;
    s[LOOP.runMean] = runMean;
    s[LOOP.up] = up;
    s[LOOP.lo] = lo;
    const length = j - blockStart;
    if (endBlock(s, xs, blockStart, j, end, found, findLastZero(upSums, length), findLastZero(lowSums, length))) return found;
    j = (s[SCAN.j] as number) | 0;
  }
}
