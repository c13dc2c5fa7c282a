import {
  envelope,
  nonFiniteOption,
  nonNegativeNumber,
  openSnapshot,
  optionsObject,
  positiveNumber,
  OptionError,
  type NonFinitePolicy,
  type Snapshot,
} from "@leeway/core";
import { acceptSample, MAX_SAMPLE_MAGNITUDE } from "@leeway/stats";
import type { ChangeReading, ChangeSides, ChangeTest } from "./change-test.js";
import { burnInSigma, burnInStep, inControlOptions, readInControlLevel, type BurnIn } from "./burn-in.js";
import { scanStart, sidesOption, warningFractionOption } from "./options.js";
import { buildFromSnapshot, definedOnly, readLevelTestFields } from "./restore-support.js";
import { sumsReading, SumsScratch } from "./sums-reading.js";
import { closeBlock, finishScan, lastZero, openScan, SCAN, SCAN_BLOCK, scanPosition } from "./scan-block.js";

/** Options of {@link Cusum}. Give `mean` and `sigma`, or `burnIn` to estimate them. */
export interface CusumOptions {
  /** Reference value k, in σ units (default 0.5: tuned to a 1σ shift). */
  k?: number;
  /** Decision interval h, in σ units (default 5). */
  h?: number;
  /** In-control mean μ₀, in score units. */
  mean?: number;
  /** In-control standard deviation σ, in score units (> 0). */
  sigma?: number;
  /** Estimate μ₀ and σ from the first `burnIn` samples (≥ 2) instead. */
  burnIn?: number;
  /** Fast initial response: both sums start (and restart) at this value, in σ units, in [0, h) (Lucas & Crosier 1982 use h/2). Default 0. */
  headStart?: number;
  /** `"both"` (default), `"up"` or `"down"`. */
  direction?: ChangeSides;
  /** `"warning"` once the statistic passes this fraction of h (default 0.5). */
  warningFraction?: number;
  /** `"refuse"` (default) or `"skip"` non-finite samples. */
  nonFinite?: NonFinitePolicy;
}

/** Plain state of a {@link Cusum} snapshot. */
export interface CusumState {
  k: number;
  h: number;
  headStart: number;
  direction: ChangeSides;
  warningFraction: number;
  nonFinite: NonFinitePolicy;
  burnInLength: number;
  burnIn: BurnIn | null;
  mean: number | null;
  sigma: number | null;
  upper: number;
  lower: number;
  upperZero: number;
  lowerZero: number;
  count: number;
  skipped: number;
}

const NAME = "Cusum";
const KNOWN = ["k", "h", "mean", "sigma", "burnIn", "headStart", "direction", "warningFraction", "nonFinite"] as const;

/**
 * Tabular CUSUM (Page, 1954), two-sided or one-sided, on standardized samples zᵢ = (xᵢ − μ₀)/σ:
 *
 *   C⁺ᵢ = max(0, C⁺ᵢ₋₁ + zᵢ − k),  C⁻ᵢ = max(0, C⁻ᵢ₋₁ − zᵢ − k),  alarm when C⁺ᵢ > h or C⁻ᵢ > h
 *
 * (k: reference value, h: decision interval, both in σ; Montgomery, *Introduction to Statistical Quality
 * Control*, §9.1). The statistic is the larger watched side; the onset is the sample after that side was
 * last zero. Optional fast initial response (head start, Lucas & Crosier 1982). μ₀ and σ are given, or
 * estimated from a burn-in (the sample mean and sample standard deviation of the first `burnIn` samples,
 * extended while those are all equal). The test does not reset itself after an alarm: call `restart()`,
 * which sets both sums back to the head start and keeps μ₀ and σ (given or estimated).
 * @example
 * const cusum = new Cusum({ mean: 0, sigma: 1, k: 0.5, h: 4 });
 * cusum.observe(1.5).statistic; // 1
 * cusum.scan(new Float64Array([1.5, 1.5, 1.5, 1.5])); // 3 (C⁺ = 2, 3, 4, 5: the fourth passes h = 4)
 */
export class Cusum implements ChangeTest {
  static readonly kind = "leeway.change.cusum";
  static readonly version = 1;
  readonly name = NAME;
  readonly #k: number; // reference value, in σ
  readonly #h: number; // decision interval, in σ
  readonly #headStart: number; // initial value of both sums, in σ
  readonly #direction: ChangeSides;
  readonly #hUp: number; // h for the watched upper side, +∞ when not watched
  readonly #hDown: number;
  readonly #warningFraction: number;
  readonly #nonFinite: NonFinitePolicy;
  readonly #burnInLength: number;
  #burnIn: BurnIn | null;
  // numeric fields start as numbers, so that the engine stores them unboxed
  #mean = Number.NaN; // μ₀ (NaN while burning in)
  #sigma = Number.NaN; // σ (NaN while burning in)
  #invSigma = Number.NaN; // 1/σ, so that the loop multiplies
  #upper = 0; // C⁺
  #lower = 0; // C⁻
  #upperZero = -1; // stream index of the last sample at which C⁺ was 0
  #lowerZero = -1;
  #count = 0;
  #skipped = 0;
  #loop: Float64Array | null = null; // scan's state in and out of cusumLoop
  #upSums: Float64Array | null = null; // scan's per-block C⁺ (allocated by the first scan), to find the last zero
  #lowSums: Float64Array | null = null;
  readonly #scratch = new SumsScratch(); // observe's reading chooses its side through it

  constructor(options: CusumOptions = {}) {
    const o = optionsObject<CusumOptions>(NAME, options, KNOWN);
    this.#k = o.k === undefined ? 0.5 : nonNegativeNumber(NAME, "k", o.k);
    this.#h = o.h === undefined ? 5 : positiveNumber(NAME, "h", o.h);
    this.#headStart = o.headStart === undefined ? 0 : nonNegativeNumber(NAME, "headStart", o.headStart);
    if (this.#headStart >= this.#h) throw new OptionError(NAME, "headStart", o.headStart, `a number in [0, h) = [0, ${this.#h})`);
    this.#direction = sidesOption(NAME, o.direction, "both");
    this.#hUp = this.#direction === "down" ? Infinity : this.#h;
    this.#hDown = this.#direction === "up" ? Infinity : this.#h;
    this.#warningFraction = warningFractionOption(NAME, o.warningFraction);
    this.#nonFinite = nonFiniteOption(NAME, o.nonFinite);
    const level = inControlOptions(NAME, o);
    this.#mean = level.mean;
    this.#sigma = level.sigma;
    this.#burnInLength = level.burnInLength;
    this.#burnIn = level.burnIn;
    this.#invSigma = 1 / this.#sigma;
    this.#upper = this.#headStart;
    this.#lower = this.#headStart;
    this.#upperZero = -1;
    this.#lowerZero = -1;
  }

  /** The decision interval h, in σ. */
  get threshold(): number {
    return this.#h;
  }
  /** The upper sum C⁺, in σ. */
  get upper(): number {
    return this.#upper;
  }
  /** The lower sum C⁻, in σ. */
  get lower(): number {
    return this.#lower;
  }
  /** μ₀ (given or estimated), or null while burning in. */
  get mean(): number | null {
    return this.#burnIn === null ? this.#mean : null;
  }
  /** σ (given or estimated), or null while burning in. */
  get sigma(): number | null {
    return this.#burnIn === null ? this.#sigma : null;
  }
  /** Finite samples taken (burn-in included). */
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
    if (this.#burnIn !== null) {
      if (burnInStep(this.#burnIn, x, this.#burnInLength)) this.#endBurnIn(i);
      return this.#reading(i);
    }
    const z = (x - this.#mean) * this.#invSigma;
    const upRaw = this.#upper + (z - this.#k);
    const up = (upRaw + Math.abs(upRaw)) * 0.5; // max(0, ·) without a branch
    const loRaw = this.#lower + (-z - this.#k);
    const lo = (loRaw + Math.abs(loRaw)) * 0.5; // max(0, ·) without a branch
    // the last zeros move to i when a sum is 0, by arithmetic (on in-control scores a branch here is a coin toss)
    this.#upperZero += (i - this.#upperZero) * +(up === 0);
    this.#lowerZero += (i - this.#lowerZero) * +(lo === 0);
    this.#upper = up;
    this.#lower = lo;
    return this.#reading(i);
  }

  scan(xs: Float64Array, from = 0): number {
    let j = scanStart(NAME, xs, from);
    const n = xs.length;
    for (; j < n && this.#burnIn !== null; j++) this.observe(xs[j] as number);
    if (j >= n) return -1;
    const s = (this.#loop ??= new Float64Array(LOOP.size));
    openScan(s, this.#count, this.#skipped, this.#nonFinite === "refuse", this.#upperZero, this.#lowerZero);
    s[LOOP.mu] = this.#mean;
    s[LOOP.inv] = this.#invSigma;
    s[LOOP.k] = this.#k;
    s[LOOP.hUp] = this.#hUp;
    s[LOOP.hDown] = this.#hDown;
    s[LOOP.up] = this.#upper;
    s[LOOP.lo] = this.#lower;
    const found = cusumLoop(xs, j, s, (this.#upSums ??= new Float64Array(SCAN_BLOCK)), (this.#lowSums ??= new Float64Array(SCAN_BLOCK)));
    this.#upper = s[LOOP.up] as number;
    this.#lower = s[LOOP.lo] as number;
    ({ count: this.#count, skipped: this.#skipped, upperZero: this.#upperZero, lowerZero: this.#lowerZero } = scanPosition(s));
    return finishScan(NAME, xs, s, found);
  }

  restart(): void {
    const i = this.#count + this.#skipped;
    this.#upper = this.#headStart;
    this.#lower = this.#headStart;
    this.#upperZero = i - 1;
    this.#lowerZero = i - 1;
  }

  snapshot(): Snapshot<CusumState> {
    const known = this.#burnIn === null;
    return envelope(Cusum.kind, Cusum.version, {
      k: this.#k,
      h: this.#h,
      headStart: this.#headStart,
      direction: this.#direction,
      warningFraction: this.#warningFraction,
      nonFinite: this.#nonFinite,
      burnInLength: this.#burnInLength,
      burnIn: this.#burnIn === null ? null : { ...this.#burnIn },
      mean: known ? this.#mean : null,
      sigma: known ? this.#sigma : null,
      upper: this.#upper,
      lower: this.#lower,
      upperZero: this.#upperZero,
      lowerZero: this.#lowerZero,
      count: this.#count,
      skipped: this.#skipped,
    });
  }

  /** Rebuilds a Cusum from {@link Cusum.snapshot}; it continues exactly where the original was. */
  static restore(snapshot: unknown): Cusum {
    const r = openSnapshot(snapshot, Cusum.kind, Cusum.version);
    const k = r.number("k");
    const h = r.number("h");
    const headStart = r.number("headStart");
    const { direction, warningFraction, nonFinite, count, skipped, upperZero, lowerZero } = readLevelTestFields(r);
    // each standardised sample moves a sum by less than 2·10²⁰⁰ + k
    const reach = headStart + count * (2 * MAX_Z + Math.abs(k));
    const upper = r.numberIn("upper", 0, reach);
    const lower = r.numberIn("lower", 0, reach);
    const level = readInControlLevel(r, count);
    const test = buildFromSnapshot(Cusum.kind, () =>
      new Cusum(definedOnly<CusumOptions>({
        k, h, headStart, direction, warningFraction, nonFinite,
        ...level.options,
      })),
    );
    if (level.estimated !== null) {
      test.#burnIn = null;
      test.#mean = level.estimated.mean;
      test.#sigma = level.estimated.sigma;
      test.#invSigma = 1 / level.estimated.sigma;
    } else if (level.burnIn !== null) {
      test.#burnIn = level.burnIn;
    }
    test.#upper = upper;
    test.#lower = lower;
    test.#upperZero = upperZero;
    test.#lowerZero = lowerZero;
    test.#count = count;
    test.#skipped = skipped;
    return test;
  }

  #endBurnIn(i: number): void {
    const b = this.#burnIn as BurnIn;
    this.#mean = b.mean;
    this.#sigma = burnInSigma(b);
    this.#invSigma = 1 / this.#sigma;
    this.#burnIn = null;
    this.#upperZero = i;
    this.#lowerZero = i;
  }

  #reading(i: number): ChangeReading {
    if (this.#burnIn !== null) return { index: i, status: "stable", statistic: 0, threshold: this.#h, skipped: this.#skipped };
    const up = this.#direction !== "down" ? this.#upper : 0;
    const lo = this.#direction !== "up" ? this.#lower : 0;
    const change = this.#upper > this.#hUp || this.#lower > this.#hDown;
    // One object shape for every reading (direction and onset undefined while the statistic is 0), so
    // that in-control data, where the sums hit zero at random, does not flip between two shapes.
    return makeReading(this.#scratch, i, change, this.#warningFraction * this.#h, up, lo, this.#upperZero, this.#lowerZero, this.#h, this.#skipped);
  }
}

/** Slots of the state array that {@link cusumLoop} reads and writes, after the shared ones (see scan-block.ts). */
const LOOP = { mu: SCAN.own, inv: SCAN.own + 1, k: SCAN.own + 2, hUp: SCAN.own + 3, hDown: SCAN.own + 4, up: SCAN.own + 5, lo: SCAN.own + 6, size: SCAN.own + 7 } as const;

// Module-local copies: under the test runner's module loader an imported binding is a getter on a
// module object, which the loop's engine code would call (and not inline) after every block.
const findLastZero = lastZero;
const makeReading = sumsReading;
const endBlock = closeBlock;
const accept = acceptSample;
const LIMIT = MAX_SAMPLE_MAGNITUDE;
/** The largest |z| = |x − μ₀|/σ: samples and μ₀ within ±10¹⁰⁰, σ ≥ 10⁻¹⁰⁰. */
const MAX_Z = 2e200;

/**
 * The hot loop of {@link Cusum.scan}, outside the class so that the engine optimizes it as a whole
 * function: the same arithmetic as `observe`, the last zeros found per block (see scan-block.ts).
 * Returns the index of the first alarm or −1; leaves in `s[SCAN.j]` where it stopped.
 */
function cusumLoop(xs: Float64Array, from: number, s: Float64Array, upSums: Float64Array, lowSums: Float64Array): number {
  const mu = s[LOOP.mu] as number;
  const inv = s[LOOP.inv] as number;
  const k = s[LOOP.k] as number;
  const hUp = s[LOOP.hUp] as number;
  const hDown = s[LOOP.hDown] as number;
  let up = s[LOOP.up] as number;
  let lo = s[LOOP.lo] as number;
  const n = xs.length;
  const block = upSums.length;
  let j = from | 0; // an int32 index: a double here turned every index into a float and boxed it each sample
  let found = -1;
  for (;;) {
    const blockStart = j;
    const end = Math.min(n, j + block);
    for (; j < end; j++) {
      const x = xs[j] as number;
      if (!(Math.abs(x) <= LIMIT)) break; // NaN, ±Infinity or beyond the accepted range
      const z = (x - mu) * inv;
      const upRaw = up + (z - k);
      up = (upRaw + Math.abs(upRaw)) * 0.5; // max(0, ·) without a branch
      const loRaw = lo + (-z - k);
      lo = (loRaw + Math.abs(loRaw)) * 0.5; // max(0, ·) without a branch
      upSums[j - blockStart] = up;
      lowSums[j - blockStart] = lo;
      if (up > hUp || lo > hDown) {
        found = j;
        j++;
        break;
      }
    }
    // The state goes back after every block, not once after the loop: the engine compiles this
    // function while its first call is still in the loop, and code that had not run by then would
    // bail out of the compiled code at the end of every later call.
    s[LOOP.up] = up;
    s[LOOP.lo] = lo;
    const length = j - blockStart;
    if (endBlock(s, xs, blockStart, j, end, found, findLastZero(upSums, length), findLastZero(lowSums, length))) return found;
    j = (s[SCAN.j] as number) | 0;
  }
}
