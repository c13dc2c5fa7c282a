import {
  envelope,
  nonFiniteOption,
  numberInRange,
  oneOf,
  openSnapshot,
  optionsObject,
  positiveNumber,
  type NonFinitePolicy,
  type Snapshot,
} from "@leeway/core";
import { acceptSample, MAX_SAMPLE_MAGNITUDE } from "@leeway/stats";
import type { ChangeDirection, ChangeReading, ChangeSides, ChangeTest } from "./change-test.js";
import { burnInSigma, burnInStep, inControlOptions, readInControlLevel, type BurnIn } from "./burn-in.js";
import { scanStart, sidesOption, warningFractionOption } from "./options.js";
import { buildFromSnapshot, definedOnly, readLevelTestFields } from "./restore-support.js";
import { closeBlock, finishScan, lastNonNegative, lastNonPositive, openScan, SCAN, SCAN_BLOCK, scanPosition } from "./scan-block.js";

/** Which control limits an {@link EwmaChart} uses. */
export type EwmaLimits = "asymptotic" | "exact";

/** Options of {@link EwmaChart}. Give `mean` and `sigma`, or `burnIn` to estimate them. */
export interface EwmaChartOptions {
  /** Smoothing constant λ in [1e-9, 1] (default 0.2). */
  lambda?: number;
  /** Limit width L, in standard deviations of the EWMA statistic (default 3). */
  L?: number;
  /** `"asymptotic"` (default: the fixed limits the published ARL tables assume) or `"exact"` (time-varying). */
  limits?: EwmaLimits;
  /** In-control mean μ₀, in score units. */
  mean?: number;
  /** In-control standard deviation σ of one sample, in score units (> 0). */
  sigma?: number;
  /** Estimate μ₀ and σ from the first `burnIn` samples (≥ 2) instead. */
  burnIn?: number;
  /** `"both"` (default), `"up"` or `"down"`. */
  direction?: ChangeSides;
  /** `"warning"` once the statistic passes this fraction of L (default 0.5). */
  warningFraction?: number;
  /** `"refuse"` (default) or `"skip"` non-finite samples. */
  nonFinite?: NonFinitePolicy;
}

/** Plain state of an {@link EwmaChart} snapshot. */
export interface EwmaChartState {
  lambda: number;
  L: number;
  limits: EwmaLimits;
  direction: ChangeSides;
  warningFraction: number;
  nonFinite: NonFinitePolicy;
  burnInLength: number;
  burnIn: BurnIn | null;
  mean: number | null;
  sigma: number | null;
  z: number;
  decay: number;
  upperZero: number;
  lowerZero: number;
  count: number;
  skipped: number;
}

const NAME = "EwmaChart";
// λ below this would let λ/(2 − λ) underflow toward 0 and the statistic divide by it (an EWMA that
// remembers more than 10^9 samples is not a use case)
const MIN_LAMBDA = 1e-9;
const KNOWN = ["lambda", "L", "limits", "mean", "sigma", "burnIn", "direction", "warningFraction", "nonFinite"] as const;

/**
 * EWMA control chart (Roberts, 1959; Lucas & Saccucci, 1990). On standardized samples uᵢ = (xᵢ − μ₀)/σ,
 *
 *   zᵢ = λ·uᵢ + (1 − λ)·zᵢ₋₁,  z₀ = 0,  alarm when |zᵢ| > L·√(λ/(2 − λ)·(1 − (1 − λ)^{2i}))
 *
 * with the exact limits, or L·√(λ/(2 − λ)) with the asymptotic ones (λ: smoothing constant, L: limit
 * width). The statistic is |zᵢ| divided by the standard deviation of zᵢ, so the threshold is L; the
 * comparison is done on squares, without a square root. The onset is the sample after zᵢ last sat on the
 * other side of μ₀. `restart()` sets z back to 0 (and the exact limits back to their start) and keeps μ₀, σ.
 * @example
 * const chart = new EwmaChart({ mean: 0, sigma: 1, lambda: 1, L: 3 }); // λ = 1: a Shewhart chart
 * chart.observe(2.5).status; // "warning"
 * chart.observe(3.5).status; // "change"
 */
export class EwmaChart implements ChangeTest {
  static readonly kind = "leeway.change.ewma-chart";
  static readonly version = 1;
  readonly name = NAME;
  readonly #lambda: number; // λ
  readonly #L: number; // L
  readonly #limits: EwmaLimits;
  readonly #direction: ChangeSides;
  readonly #warningFraction: number;
  readonly #nonFinite: NonFinitePolicy;
  readonly #variance: number; // λ/(2 − λ): the asymptotic variance of z in σ²
  readonly #boundUp: number; // L²·λ/(2 − λ) for a watched upper side, +∞ otherwise
  readonly #boundDown: number;
  readonly #decayStep: number; // (1 − λ)² for exact limits, 0 for asymptotic ones
  readonly #burnInLength: number;
  #burnIn: BurnIn | null;
  // numeric fields start as numbers, so that the engine stores them unboxed
  #mean = Number.NaN;
  #sigma = Number.NaN;
  #invSigma = Number.NaN;
  #z = 0; // EWMA statistic, in σ
  #decay = 1; // (1 − λ)^{2i}
  #upperZero = -1; // stream index of the last sample with z ≤ 0
  #lowerZero = -1; // … with z ≥ 0
  #count = 0;
  #skipped = 0;
  #loop: Float64Array | null = null; // scan's state in and out of ewmaLoop
  #zs: Float64Array | null = null; // scan's per-block z, to find the last sign change

  constructor(options: EwmaChartOptions = {}) {
    const o = optionsObject<EwmaChartOptions>(NAME, options, KNOWN);
    this.#lambda = o.lambda === undefined ? 0.2 : numberInRange(NAME, "lambda", o.lambda, { min: MIN_LAMBDA, max: 1 });
    this.#L = o.L === undefined ? 3 : positiveNumber(NAME, "L", o.L);
    this.#limits = o.limits === undefined ? "asymptotic" : oneOf(NAME, "limits", o.limits, ["asymptotic", "exact"] as const);
    this.#direction = sidesOption(NAME, o.direction, "both");
    this.#warningFraction = warningFractionOption(NAME, o.warningFraction);
    this.#nonFinite = nonFiniteOption(NAME, o.nonFinite);
    this.#variance = this.#lambda / (2 - this.#lambda);
    const bound = this.#L * this.#L * this.#variance;
    this.#boundUp = this.#direction === "down" ? Infinity : bound;
    this.#boundDown = this.#direction === "up" ? Infinity : bound;
    this.#decayStep = this.#limits === "exact" ? (1 - this.#lambda) * (1 - this.#lambda) : 0;
    const level = inControlOptions(NAME, o);
    this.#mean = level.mean;
    this.#sigma = level.sigma;
    this.#burnInLength = level.burnInLength;
    this.#burnIn = level.burnIn;
    this.#invSigma = 1 / this.#sigma;
  }

  /** The limit width L. */
  get threshold(): number {
    return this.#L;
  }
  /** The EWMA statistic in score units, μ₀ + σ·z (μ₀ while burning in: NaN). */
  get ewma(): number {
    return this.#mean + this.#sigma * this.#z;
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
    const u = (x - this.#mean) * this.#invSigma;
    const z = (1 - this.#lambda) * this.#z + this.#lambda * u;
    this.#z = z;
    // (1 − λ)^{2i} is flushed to 0 once 1 − q is exactly 1, before it turns subnormal (and slow)
    this.#decay = this.#decay > 1e-20 ? this.#decay * this.#decayStep : 0;
    // (branches here measured faster than moving the last sign changes by arithmetic, as CUSUM does)
    if (z <= 0) this.#upperZero = i;
    if (z >= 0) this.#lowerZero = i;
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
    s[LOOP.lambda] = this.#lambda;
    s[LOOP.step] = this.#decayStep;
    s[LOOP.bUp] = this.#boundUp;
    s[LOOP.bDown] = this.#boundDown;
    s[LOOP.z] = this.#z;
    s[LOOP.q] = this.#decay;
    const found = ewmaLoop(xs, j, s, (this.#zs ??= new Float64Array(SCAN_BLOCK)));
    this.#z = s[LOOP.z] as number;
    this.#decay = s[LOOP.q] as number;
    ({ count: this.#count, skipped: this.#skipped, upperZero: this.#upperZero, lowerZero: this.#lowerZero } = scanPosition(s));
    return finishScan(NAME, xs, s, found);
  }

  restart(): void {
    const i = this.#count + this.#skipped;
    this.#z = 0;
    this.#decay = 1;
    this.#upperZero = i - 1;
    this.#lowerZero = i - 1;
  }

  snapshot(): Snapshot<EwmaChartState> {
    const known = this.#burnIn === null;
    return envelope(EwmaChart.kind, EwmaChart.version, {
      lambda: this.#lambda,
      L: this.#L,
      limits: this.#limits,
      direction: this.#direction,
      warningFraction: this.#warningFraction,
      nonFinite: this.#nonFinite,
      burnInLength: this.#burnInLength,
      burnIn: this.#burnIn === null ? null : { ...this.#burnIn },
      mean: known ? this.#mean : null,
      sigma: known ? this.#sigma : null,
      z: this.#z,
      decay: this.#decay,
      upperZero: this.#upperZero,
      lowerZero: this.#lowerZero,
      count: this.#count,
      skipped: this.#skipped,
    });
  }

  /** Rebuilds an EwmaChart from {@link EwmaChart.snapshot}; it continues exactly where the original was. */
  static restore(snapshot: unknown): EwmaChart {
    const r = openSnapshot(snapshot, EwmaChart.kind, EwmaChart.version);
    const lambda = r.number("lambda");
    const L = r.number("L");
    const limits = r.oneOf("limits", ["asymptotic", "exact"] as const);
    const { direction, warningFraction, nonFinite, count, skipped, upperZero, lowerZero } = readLevelTestFields(r);
    // z is a weighted mean of standardised samples, each within ±2·10²⁰⁰
    const z = r.numberIn("z", -MAX_Z, MAX_Z);
    const decay = r.numberIn("decay", 0, 1);
    if (count === 0 && z !== 0) r.fail("z", "must be 0 before the first sample");
    const level = readInControlLevel(r, count);
    const test = buildFromSnapshot(EwmaChart.kind, () =>
      new EwmaChart(definedOnly<EwmaChartOptions>({
        lambda, L, limits, direction, warningFraction, nonFinite,
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
    test.#z = z;
    test.#decay = decay;
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
    if (this.#burnIn !== null || this.#count === 0) return { index: i, status: "stable", statistic: 0, threshold: this.#L, skipped: this.#skipped };
    const z = this.#z;
    const spread = 1 - this.#decay;
    const watched = z > 0 ? this.#direction !== "down" : z < 0 ? this.#direction !== "up" : false;
    // |z|/√(σ_z²·spread) rather than √(z²/…): z² may overflow for a far-off sample
    const statistic = watched && spread > 0 ? Math.abs(z) / Math.sqrt(this.#variance * spread) : 0;
    const change = z * z > (z > 0 ? this.#boundUp : this.#boundDown) * spread;
    const status = change ? "change" : statistic > this.#warningFraction * this.#L ? "warning" : "stable";
    if (!watched) return { index: i, status, statistic, threshold: this.#L, skipped: this.#skipped };
    const direction: ChangeDirection = z > 0 ? "up" : "down";
    const onset = (direction === "up" ? this.#upperZero : this.#lowerZero) + 1;
    return { index: i, status, statistic, threshold: this.#L, direction, onset, skipped: this.#skipped };
  }
}

/** Slots of the state array that {@link ewmaLoop} reads and writes, after the shared ones (see scan-block.ts). */
const LOOP = { mu: SCAN.own, inv: SCAN.own + 1, lambda: SCAN.own + 2, step: SCAN.own + 3, bUp: SCAN.own + 4, bDown: SCAN.own + 5, z: SCAN.own + 6, q: SCAN.own + 7, size: SCAN.own + 8 } as const;

// Module-local copies: under the test runner's module loader an imported binding is a getter on a
// module object, which the loop's engine code would call (and not inline) after every block.
const findLastNonNegative = lastNonNegative;
const findLastNonPositive = lastNonPositive;
const endBlock = closeBlock;
const accept = acceptSample;
const LIMIT = MAX_SAMPLE_MAGNITUDE;
/** The largest |z|: samples and μ₀ within ±10¹⁰⁰, σ ≥ 10⁻¹⁰⁰. */
const MAX_Z = 2e200;

/**
 * The hot loop of {@link EwmaChart.scan}, outside the class so that the engine optimizes it as a whole
 * function: the same arithmetic as `observe`, the last sign changes found per block.
 * Returns the index of the first alarm or −1; leaves in `s[SCAN.j]` where it stopped.
 */
function ewmaLoop(xs: Float64Array, from: number, s: Float64Array, zs: Float64Array): number {
  const mu = s[LOOP.mu] as number;
  const inv = s[LOOP.inv] as number;
  const lam = s[LOOP.lambda] as number;
  const keep = 1 - lam;
  const step = s[LOOP.step] as number;
  const bUp = s[LOOP.bUp] as number;
  const bDown = s[LOOP.bDown] as number;
  const symmetric = bUp === bDown;
  let z = s[LOOP.z] as number;
  let q = s[LOOP.q] as number;
  const n = xs.length;
  const block = zs.length;
  let j = from | 0; // an int32 index: a double here turned every index into a float and boxed it each sample
  let found = -1;
  for (;;) {
    const blockStart = j;
    const end = Math.min(n, j + block);
    for (; j < end; j++) {
      const x = xs[j] as number;
      if (!(Math.abs(x) <= LIMIT)) break; // NaN, ±Infinity or beyond the accepted range
      const u = (x - mu) * inv;
      z = keep * z + lam * u;
      q = q > 1e-20 ? q * step : 0;
      zs[j - blockStart] = z;
      // two-sided with equal limits: no branch on the sign of z
      if (z * z > (symmetric ? bUp : z > 0 ? bUp : bDown) * (1 - q)) {
        found = j;
        j++;
        break;
      }
    }
    // The state goes back after every block (see cusum.ts).
    s[LOOP.z] = z;
    s[LOOP.q] = q;
    const length = j - blockStart;
    if (endBlock(s, xs, blockStart, j, end, found, findLastNonPositive(zs, length), findLastNonNegative(zs, length))) return found;
    j = (s[SCAN.j] as number) | 0;
  }
}
