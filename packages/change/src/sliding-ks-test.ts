import {
  envelope,
  finiteArray,
  integerInRange,
  nonFiniteOption,
  NonFiniteError,
  numberInRange,
  openSnapshot,
  optionsObject,
  OptionError,
  positiveInteger,
  positiveNumber,
  type NonFinitePolicy,
  type Snapshot,
} from "@leeway/core";
import { acceptSample, kolmogorovSurvival } from "@leeway/stats";
import type { ChangeDirection, ChangeReading, ChangeTest } from "./change-test.js";
import { scanStart, warningFractionOption } from "./options.js";
import { KsGaps } from "./ks-gaps.js";
import { buildFromSnapshot, definedOnly } from "./restore-support.js";

/** Options of {@link SlidingKsTest}. */
export interface SlidingKsTestOptions {
  /** Samples w in the sliding recent window (default 100, at least 8). */
  recentSize?: number;
  /** A fixed reference sample; when absent, the first `referenceSize` samples of the stream form it. */
  referenceSample?: ArrayLike<number>;
  /** Size of the reference taken from the stream (default: `recentSize`). */
  referenceSize?: number;
  /** Alarm when the asymptotic p-value is below this significance level α (default 0.001). */
  significance?: number;
  /** Alarm when D passes this critical value instead (> 0; D never exceeds 1); overrides `significance` (use it to calibrate). */
  criticalD?: number;
  /** Test every this many samples once both windows are full (default 1). */
  checkPeriod?: number;
  /** `"warning"` once D passes this fraction of the critical value (default 0.5). */
  warningFraction?: number;
  /** `"refuse"` (default) or `"skip"` non-finite samples. */
  nonFinite?: NonFinitePolicy;
}

/** The reading of a {@link SlidingKsTest}: a {@link ChangeReading} (statistic D) with the p-value of the latest test. */
export interface SlidingKsReading extends ChangeReading {
  /** Asymptotic two-sided p-value Q_KS(√(nw/(n + w))·D), 1 before the first test. */
  pValue: number;
}

/** Plain state of a {@link SlidingKsTest} snapshot. */
export interface SlidingKsTestState {
  recentSize: number;
  referenceSize: number;
  significance: number;
  criticalD: number;
  checkPeriod: number;
  warningFraction: number;
  nonFinite: NonFinitePolicy;
  reference: number[];
  recent: number[];
  statistic: number;
  direction: ChangeDirection;
  sinceCheck: number;
  count: number;
  skipped: number;
}

const NAME = "SlidingKsTest";
const KNOWN = ["recentSize", "referenceSample", "referenceSize", "significance", "criticalD", "checkPeriod", "warningFraction", "nonFinite"] as const;

/**
 * A windowed two-sample Kolmogorov-Smirnov test: a reference sample (given, or the first
 * `referenceSize` samples) against the latest w samples, D = supₓ |F_ref(x) − F_recent(x)|, alarm when the
 * asymptotic p-value Q_KS(√(nw/(n + w))·D) (Smirnov, 1948) is below α, i.e. when D passes the critical
 * value D_α = Q_KS⁻¹(α)/√(nw/(n + w)). The statistic is D and the threshold D_α.
 *
 * Repeated testing: α is the false-alarm chance of *one* test; testing after every sample, with windows
 * that overlap, the in-control run length is far shorter than 1/α (and not geometric). Choose the
 * threshold for a target run length with `calibrateThreshold` rather than from α.
 * The direction is `"up"` when the recent sample is stochastically larger. The test keeps alarming while
 * D stays above D_α; `restart()` empties the recent window and keeps the reference.
 *
 * Cost: O(log k) per sample (k distinct reference values) and O(1) per test: the two one-sided
 * gaps at the reference values are kept in segment trees ({@link KsGaps}) instead of merging both
 * sorted windows at every test. D is the exact largest gap rounded once (an integer over nm); a
 * merge that forms i/n − j/m in floating point can differ from it in the last bits (by less than
 * 1e-15). Memory: 48 bytes per tree leaf (the k distinct reference values rounded up to a power of
 * two) plus 24 per distinct value, beside the two windows.
 * @example
 * const ks = new SlidingKsTest({ referenceSample: [0, 1, 2, 3, 4, 5, 6, 7], recentSize: 8, significance: 0.01 });
 * ks.scan(new Float64Array([10, 11, 12, 13, 14, 15, 16, 17])); // 7 (D = 1 once the window is full)
 */
export class SlidingKsTest implements ChangeTest {
  static readonly kind = "leeway.change.sliding-ks-test";
  static readonly version = 1;
  readonly name = NAME;
  readonly #w: number;
  readonly #referenceSize: number;
  readonly #alpha: number;
  readonly #critical: number; // D_α
  readonly #checkPeriod: number;
  readonly #warningFraction: number;
  readonly #nonFinite: NonFinitePolicy;
  readonly #reference: Float64Array; // sorted once full
  #referenceCount = 0;
  readonly #ring: Float64Array; // recent samples, chronological from #ringStart
  readonly #ringPlace: Int32Array; // where each recent sample sits among the reference levels (KsGaps.place)
  #ringStart = 0;
  #recentCount = 0;
  #gaps: KsGaps | null = null; // once the reference is complete
  #statistic = 0;
  #direction: ChangeDirection = "up";
  #sinceCheck = 0;
  #count = 0;
  #skipped = 0;

  constructor(options: SlidingKsTestOptions = {}) {
    const o = optionsObject<SlidingKsTestOptions>(NAME, options, KNOWN);
    this.#w = o.recentSize === undefined ? 100 : integerInRange(NAME, "recentSize", o.recentSize, 8, 2 ** 20);
    let reference: Float64Array | null = null;
    if (o.referenceSample !== undefined) {
      if (o.referenceSize !== undefined) throw new OptionError(NAME, "referenceSize", o.referenceSize, "absent when referenceSample is given");
      reference = finiteArray(NAME, "referenceSample", o.referenceSample, { atLeast: 8, atMost: 2 ** 22 });
      this.#referenceSize = reference.length;
    } else {
      this.#referenceSize = o.referenceSize === undefined ? this.#w : integerInRange(NAME, "referenceSize", o.referenceSize, 8, 2 ** 22);
    }
    this.#alpha = o.significance === undefined ? 0.001 : numberInRange(NAME, "significance", o.significance, { min: 0, max: 1, minExclusive: true, maxExclusive: true });
    const n = this.#referenceSize;
    const scale = Math.sqrt((n * this.#w) / (n + this.#w));
    this.#critical = o.criticalD === undefined ? kolmogorovQuantile(this.#alpha) / scale : positiveNumber(NAME, "criticalD", o.criticalD);
    this.#checkPeriod = o.checkPeriod === undefined ? 1 : positiveInteger(NAME, "checkPeriod", o.checkPeriod, 2 ** 20);
    this.#warningFraction = warningFractionOption(NAME, o.warningFraction);
    this.#nonFinite = nonFiniteOption(NAME, o.nonFinite);
    this.#reference = new Float64Array(n);
    if (reference !== null) {
      this.#reference.set(reference);
      this.#reference.sort();
      this.#referenceCount = n;
      this.#gaps = new KsGaps(this.#reference, this.#w);
    }
    this.#ring = new Float64Array(this.#w);
    this.#ringPlace = new Int32Array(this.#w);
  }

  /** The critical value D_α. */
  get threshold(): number {
    return this.#critical;
  }
  /** D of the latest test. */
  get statistic(): number {
    return this.#statistic;
  }
  /** True once the reference sample is complete. */
  get hasReference(): boolean {
    return this.#referenceCount === this.#referenceSize;
  }
  /** Finite samples taken. */
  get count(): number {
    return this.#count;
  }
  /** Non-finite samples skipped. */
  get skipped(): number {
    return this.#skipped;
  }

  observe(x: number): SlidingKsReading {
    const i = this.#count + this.#skipped;
    if (!(typeof x === "number" && x - x === 0)) {
      acceptSample(NAME, "x", this.#nonFinite, x); // throws unless a non-finite number to skip (order only: no range)
      this.#skipped += 1;
    } else {
      this.#step(x);
    }
    const d = this.#statistic;
    const n = this.#referenceSize;
    const status = d > this.#critical ? "change" : d > this.#warningFraction * this.#critical ? "warning" : "stable";
    const pValue = d > 0 ? kolmogorovSurvival(Math.sqrt((n * this.#w) / (n + this.#w)) * d) : 1;
    const reading: SlidingKsReading = { index: i, status, statistic: d, threshold: this.#critical, skipped: this.#skipped, pValue };
    if (d > 0) {
      reading.direction = this.#direction;
      reading.onset = i - this.#recentCount + 1;
    }
    return reading;
  }

  scan(xs: Float64Array, from = 0): number {
    const start = scanStart(NAME, xs, from);
    const n = xs.length;
    const refuse = this.#nonFinite === "refuse";
    for (let j = start; j < n; j++) {
      const x = xs[j] as number;
      if (!(x - x === 0)) {
        if (refuse) throw new NonFiniteError(NAME, `xs[${j}]`, x);
        this.#skipped += 1;
        continue;
      }
      this.#step(x);
      if (this.#statistic > this.#critical) return j;
    }
    return -1;
  }

  restart(): void {
    this.#gaps?.clear();
    this.#ringStart = 0;
    this.#recentCount = 0;
    this.#statistic = 0;
    this.#sinceCheck = 0;
  }

  snapshot(): Snapshot<SlidingKsTestState> {
    const recent: number[] = [];
    for (let k = 0; k < this.#recentCount; k++) recent.push(this.#ring[(this.#ringStart + k) % this.#w] as number);
    return envelope(SlidingKsTest.kind, SlidingKsTest.version, {
      recentSize: this.#w,
      referenceSize: this.#referenceSize,
      significance: this.#alpha,
      criticalD: this.#critical,
      checkPeriod: this.#checkPeriod,
      warningFraction: this.#warningFraction,
      nonFinite: this.#nonFinite,
      reference: Array.from(this.#reference.subarray(0, this.#referenceCount)),
      recent,
      statistic: this.#statistic,
      direction: this.#direction,
      sinceCheck: this.#sinceCheck,
      count: this.#count,
      skipped: this.#skipped,
    });
  }

  /** Rebuilds a SlidingKsTest from {@link SlidingKsTest.snapshot}; it continues exactly where the original was. */
  static restore(snapshot: unknown): SlidingKsTest {
    const r = openSnapshot(snapshot, SlidingKsTest.kind, SlidingKsTest.version);
    const recentSize = r.integer("recentSize", 8, 2 ** 20);
    const referenceSize = r.integer("referenceSize", 8, 2 ** 22);
    const significance = r.number("significance");
    const criticalD = r.number("criticalD");
    const checkPeriod = r.integer("checkPeriod", 1, 2 ** 20);
    const warningFraction = r.number("warningFraction");
    const nonFinite = r.oneOf("nonFinite", ["refuse", "skip"] as const);
    const count = r.integer("count", 0, Number.MAX_SAFE_INTEGER);
    const skipped = r.integer("skipped", 0, Number.MAX_SAFE_INTEGER);
    const reference = r.numbers("reference", { max: referenceSize });
    const recent = r.numbers("recent", { max: recentSize });
    const statistic = r.numberIn("statistic", 0, 1);
    const direction = r.oneOf("direction", ["up", "down"] as const);
    const sinceCheck = r.integer("sinceCheck", 0, checkPeriod - 1);
    if (recent.length > 0 && reference.length < referenceSize) r.fail("recent", "must be empty until the reference is complete");
    if (reference.length + recent.length > count) r.fail("count", `must be at least the samples held (${reference.length + recent.length}), got ${count}`);
    // while the reference is being collected every finite sample goes into it
    if (reference.length < referenceSize && count !== reference.length) r.fail("reference", `holds ${reference.length} samples, but count says ${count} were taken while it was being collected`);
    // no test runs before the recent window is full (after the start or a restart)
    if (recent.length < recentSize && statistic !== 0) r.fail("statistic", `must be 0 while the recent window is not full (${recent.length} of ${recentSize}), got ${statistic}`);
    if (recent.length < recentSize && sinceCheck !== 0) r.fail("sinceCheck", `must be 0 while the recent window is not full, got ${sinceCheck}`);
    for (let k = 1; k < reference.length && reference.length === referenceSize; k++) {
      if ((reference[k] as number) < (reference[k - 1] as number)) r.fail("reference", "must be sorted once complete");
    }
    const test = buildFromSnapshot(SlidingKsTest.kind, () =>
      new SlidingKsTest(definedOnly<SlidingKsTestOptions>({ recentSize, referenceSize, significance, criticalD, checkPeriod, warningFraction, nonFinite })),
    );
    test.#reference.set(reference);
    test.#referenceCount = reference.length;
    if (reference.length === referenceSize) test.#gaps ??= new KsGaps(test.#reference, recentSize);
    for (let k = 0; k < recent.length; k++) test.#push(recent[k] as number);
    test.#statistic = statistic;
    test.#direction = direction;
    test.#sinceCheck = sinceCheck;
    test.#count = count;
    test.#skipped = skipped;
    return test;
  }

  #step(x: number): void {
    this.#count += 1;
    const gaps = this.#gaps;
    if (gaps === null) {
      this.#reference[this.#referenceCount++] = x;
      if (this.#referenceCount === this.#referenceSize) {
        this.#reference.sort();
        this.#gaps = new KsGaps(this.#reference, this.#w);
      }
      return;
    }
    const w = this.#w;
    if (this.#recentCount < w) {
      this.#push(x);
      if (this.#recentCount === w) {
        // the first test comes as soon as the recent window is full
        this.#sinceCheck = 0;
        this.#test(gaps);
      }
      return;
    }
    const start = this.#ringStart;
    const place = gaps.place(x);
    gaps.move(this.#ringPlace[start] as number, place);
    this.#ring[start] = x;
    this.#ringPlace[start] = place;
    this.#ringStart = start + 1 === w ? 0 : start + 1;
    this.#sinceCheck += 1;
    if (this.#sinceCheck < this.#checkPeriod) return;
    this.#sinceCheck = 0;
    this.#test(gaps);
  }

  /** Appends a sample to a recent window that is not full yet. */
  #push(x: number): void {
    const gaps = this.#gaps as KsGaps;
    const at = (this.#ringStart + this.#recentCount) % this.#w;
    const place = gaps.place(x);
    gaps.add(place);
    this.#ring[at] = x;
    this.#ringPlace[at] = place;
    this.#recentCount += 1;
  }

  /** D = sup |F_ref − F_recent| = max(D⁺, D⁻) from the kept gaps: the exact integer over nm, rounded once. */
  #test(gaps: KsGaps): void {
    const high = gaps.aboveKey; // nm·max (F_ref − F_recent): the recent sample sits higher
    const low = gaps.belowKey; // nm·max (F_recent − F_ref)
    this.#statistic = (high >= low ? high : low) / gaps.scale;
    this.#direction = high >= low ? "up" : "down";
  }
}

/** Q_KS⁻¹(α): the λ with kolmogorovSurvival(λ) = α, by bisection (Q_KS decreases in λ). */
function kolmogorovQuantile(alpha: number): number {
  let lo = 0;
  let hi = 10;
  for (let it = 0; it < 200 && hi - lo > 1e-15; it++) {
    const mid = 0.5 * (lo + hi);
    if (kolmogorovSurvival(mid) > alpha) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}
