import {
  envelope,
  finiteArray,
  integerInRange,
  nonFiniteOption,
  NonFiniteError,
  numberInRange,
  oneOf,
  openSnapshot,
  OptionError,
  optionsObject,
  RandomSource,
  requireNumber,
  seedOption,
  type NonFinitePolicy,
  type Snapshot,
} from "@leeway/core";
import type { ChangeReading, ChangeSides, ChangeTest } from "./change-test.js";
import { jumperLogBet, mixtureLogBet, powerLogBet, type ConformalBetting } from "./conformal-betting.js";
import { scanStart, sidesOption, warningFractionOption } from "./options.js";
import { RankCounts } from "./rank-counts.js";
import { buildFromSnapshot, definedOnly } from "./restore-support.js";

/** The most grid points a {@link ConformalMartingale} takes (its grid is the burn-in's or the reference's values). */
export const CONFORMAL_MAX_GRID = 4096;

/** Options of {@link ConformalMartingale}. Give `burnIn` (default 100) or `reference`. */
export interface ConformalMartingaleOptions {
  /** Alarm when the martingale reaches λ (> 1, default 100): on an exchangeable stream P(ever) ≤ 1/λ. */
  threshold?: number;
  /**
   * `"jumper"` (default: Simple Jumper, which recovers after long in-control stretches), `"power"`
   * (ε·p^{ε−1}) or `"mixture"` (∫₀¹ ε·p^{ε−1} dε). Power and mixture lose capital steadily while
   * nothing changes (the mixture about ten times faster), so their delay grows with the time in control.
   */
  betting?: ConformalBetting;
  /** ε of the power betting, in (0, 1) (default 0.92). */
  epsilon?: number;
  /** J of the jumper betting: the share of capital respread before each p-value, in (0, 1) (default 0.01). */
  jump?: number;
  /** The first m samples (an integer in [10, 4096], default 100) fix the grid of the nonconformity score and are not tested. */
  burnIn?: number;
  /** In-control values (2 … 4096, finite) that fix the grid instead of a burn-in: every sample is then tested. */
  reference?: ArrayLike<number>;
  /** `"up"` (default: scores rising), `"down"` or `"both"`. */
  direction?: ChangeSides;
  /** Seed of the random tie-breaking θ of the smoothed p-values (default 1). */
  seed?: number | string;
  /** `"warning"` once the martingale passes this fraction of λ (default 0.5). */
  warningFraction?: number;
  /** `"refuse"` (default) or `"skip"` non-finite samples. */
  nonFinite?: NonFinitePolicy;
}

/** A {@link ConformalMartingale} reading: the change reading plus the last p-value and ln of the martingale. */
export interface ConformalReading extends ChangeReading {
  /** The smoothed conformal p-value of the sample; null during the burn-in and for a skipped sample. */
  pValue: number | null;
  /** ln M, the natural log of the martingale (the statistic is M itself, capped at e^700). */
  logValue: number;
}

/** Plain state of a {@link ConformalMartingale} snapshot. */
export interface ConformalMartingaleState {
  threshold: number;
  betting: ConformalBetting;
  epsilon: number;
  jump: number;
  burnIn: number;
  fromReference: boolean;
  direction: ChangeSides;
  warningFraction: number;
  nonFinite: NonFinitePolicy;
  /** The grid: sorted once complete, the burn-in's values in arrival order while it fills. */
  grid: number[];
  /** Count of each nonconformity value 0 … grid size among the tested samples; null during the burn-in. */
  counts: number[] | null;
  logValue: number;
  lowestLog: number;
  lowestIndex: number;
  shares: number[];
  count: number;
  skipped: number;
  random: unknown;
}

const NAME = "ConformalMartingale";
const KNOWN = ["threshold", "betting", "epsilon", "jump", "burnIn", "reference", "direction", "seed", "warningFraction", "nonFinite"] as const;
const LOG_CAP = 700; // e^700 is still a finite double

/**
 * A change test with a finite-sample false-alarm guarantee and no calibration run: a conformal test
 * martingale (Vovk, Nouretdinov & Gammerman, 2003; for change detection Volkhonskiy, Burnaev,
 * Nouretdinov, Gammerman & Vovk, 2017).
 *
 * Each sample x gets a nonconformity score: its bin b among the m grid values (the number of grid
 * values below x), taken as b (`"up"`), m − b (`"down"`) or |2b − m| (`"both"`). Its smoothed
 * conformal p-value against the n samples tested before it is
 * p = (#{α_i > α} + θ·(#{α_i = α} + 1))/(n + 1), θ uniform on (0, 1]. On an exchangeable stream
 * these p-values are independent and uniform (Vovk, Gammerman & Shafer, 2005, ch. 7), so the
 * product M = Π f(p_i) of a betting function with ∫₀¹ f = 1 is a test martingale, and by Ville's
 * inequality P(M ever ≥ λ) ≤ 1/λ. Binning keeps that exact (a binned score is a nonconformity
 * score too; ties are broken by θ) and the memory bounded (m + 1 counts, a Fenwick tree). The grid
 * is the sorted values of a burn-in that is not tested, or `reference` values from outside the stream.
 *
 * The onset is the sample after the martingale's lowest point since the start or the last
 * restart. `restart()` sets M back to 1, the jumper's arms to ½ each, and forgets the tested
 * samples' counts; it keeps the grid and the random source's position.
 * @example
 * const m = new ConformalMartingale({ reference: [0.1, 0.2, 0.3, 0.4, 0.5], threshold: 20 });
 * const xs = new Float64Array(200).map((_, i) => (i < 100 ? ((i * 7) % 10) / 20 : 1));
 * m.scan(xs); // 115: the 16th sample above every earlier one brings M past 20
 */
export class ConformalMartingale implements ChangeTest {
  static readonly kind = "leeway.change.conformal-martingale";
  static readonly version = 1;
  readonly name = NAME;
  readonly #threshold: number; // λ
  readonly #logThreshold: number;
  readonly #betting: ConformalBetting;
  readonly #epsilon: number;
  readonly #jump: number;
  readonly #burnIn: number; // m when the grid comes from a burn-in
  readonly #fromReference: boolean;
  readonly #direction: ChangeSides;
  readonly #warningFraction: number;
  readonly #nonFinite: NonFinitePolicy;
  readonly #seed: number | string;
  #grid: Float64Array; // sorted once complete
  #gridFill = 0; // values in the grid so far
  #counts: RankCounts | null = null; // null during the burn-in
  #logValue = 0; // ln M
  #lowestLog = 0;
  #lowestIndex = -1; // stream index at which ln M was lowest (−1: at the start)
  readonly #shares = new Float64Array([0.5, 0.5]); // the jumper's two arms
  #count = 0;
  #skipped = 0;
  #random: RandomSource;
  #lastP: number | null = null;

  constructor(options: ConformalMartingaleOptions = {}) {
    const o = optionsObject<ConformalMartingaleOptions>(NAME, options, KNOWN);
    this.#threshold = o.threshold === undefined ? 100 : numberInRange(NAME, "threshold", o.threshold, { min: 1, max: Math.exp(LOG_CAP), minExclusive: true });
    this.#logThreshold = Math.log(this.#threshold);
    this.#betting = o.betting === undefined ? "jumper" : oneOf(NAME, "betting", o.betting, ["jumper", "power", "mixture"] as const);
    this.#epsilon = o.epsilon === undefined ? 0.92 : numberInRange(NAME, "epsilon", o.epsilon, { min: 0, max: 1, minExclusive: true, maxExclusive: true });
    this.#jump = o.jump === undefined ? 0.01 : numberInRange(NAME, "jump", o.jump, { min: 0, max: 1, minExclusive: true, maxExclusive: true });
    this.#direction = sidesOption(NAME, o.direction, "up");
    this.#warningFraction = warningFractionOption(NAME, o.warningFraction);
    this.#nonFinite = nonFiniteOption(NAME, o.nonFinite);
    this.#seed = o.seed === undefined ? 1 : seedOption(NAME, "seed", o.seed);
    this.#random = new RandomSource(this.#seed);
    if (o.reference !== undefined) {
      if (o.burnIn !== undefined) throw new OptionError(NAME, "burnIn", o.burnIn, "left out when a reference is given (the reference fixes the grid)");
      const reference = finiteArray(NAME, "reference", o.reference, { atLeast: 2, atMost: CONFORMAL_MAX_GRID });
      this.#grid = reference.sort();
      this.#gridFill = reference.length;
      this.#burnIn = reference.length;
      this.#fromReference = true;
      this.#counts = new RankCounts(reference.length + 1);
    } else {
      this.#burnIn = o.burnIn === undefined ? 100 : integerInRange(NAME, "burnIn", o.burnIn, 10, CONFORMAL_MAX_GRID);
      this.#grid = new Float64Array(this.#burnIn);
      this.#fromReference = false;
    }
  }

  /** The threshold λ: alarm when the martingale reaches it. */
  get threshold(): number {
    return this.#threshold;
  }
  /** The martingale M (1 at the start and after a restart; capped at e^700). */
  get value(): number {
    return Math.exp(Math.min(this.#logValue, LOG_CAP));
  }
  /** ln M. */
  get logValue(): number {
    return this.#logValue;
  }
  /** True once the grid is complete (after the burn-in, or at once with a reference). */
  get ready(): boolean {
    return this.#counts !== null;
  }
  /** Finite samples taken (burn-in included). */
  get count(): number {
    return this.#count;
  }
  /** Non-finite samples skipped. */
  get skipped(): number {
    return this.#skipped;
  }

  observe(x: number): ConformalReading {
    requireNumber(NAME, "x", x);
    const i = this.#count + this.#skipped;
    if (!(x - x === 0)) {
      if (this.#nonFinite === "refuse") throw new NonFiniteError(NAME, "x", x);
      this.#skipped += 1;
      this.#lastP = null;
      return this.#reading(i);
    }
    this.#step(x, i);
    return this.#reading(i);
  }

  scan(xs: Float64Array, from = 0): number {
    const start = scanStart(NAME, xs, from);
    for (let j = start; j < xs.length; j++) {
      const x = xs[j] as number;
      const i = this.#count + this.#skipped;
      if (!(x - x === 0)) {
        if (this.#nonFinite === "refuse") throw new NonFiniteError(NAME, `xs[${j}]`, x);
        this.#skipped += 1;
        this.#lastP = null;
        continue;
      }
      this.#step(x, i);
      if (this.#logValue >= this.#logThreshold) return j;
    }
    return -1;
  }

  restart(): void {
    this.#logValue = 0;
    this.#lowestLog = 0;
    this.#lowestIndex = this.#count + this.#skipped - 1;
    this.#shares.fill(0.5);
    this.#counts?.clear();
  }

  snapshot(): Snapshot<ConformalMartingaleState> {
    return envelope(ConformalMartingale.kind, ConformalMartingale.version, {
      threshold: this.#threshold,
      betting: this.#betting,
      epsilon: this.#epsilon,
      jump: this.#jump,
      burnIn: this.#burnIn,
      fromReference: this.#fromReference,
      direction: this.#direction,
      warningFraction: this.#warningFraction,
      nonFinite: this.#nonFinite,
      grid: Array.from(this.#grid.subarray(0, this.#gridFill)),
      counts: this.#counts === null ? null : this.#counts.counts(),
      logValue: this.#logValue,
      lowestLog: this.#lowestLog,
      lowestIndex: this.#lowestIndex,
      shares: Array.from(this.#shares),
      count: this.#count,
      skipped: this.#skipped,
      random: this.#random.snapshot(),
    });
  }

  /** Rebuilds a ConformalMartingale from {@link ConformalMartingale.snapshot}; it continues exactly where the original was. */
  static restore(snapshot: unknown): ConformalMartingale {
    const r = openSnapshot(snapshot, ConformalMartingale.kind, ConformalMartingale.version);
    const threshold = r.number("threshold");
    const betting = r.oneOf("betting", ["jumper", "power", "mixture"] as const);
    const epsilon = r.number("epsilon");
    const jump = r.number("jump");
    const fromReference = r.boolean("fromReference");
    const burnIn = r.integer("burnIn", fromReference ? 2 : 10, CONFORMAL_MAX_GRID);
    const direction = r.oneOf("direction", ["up", "down", "both"] as const);
    const warningFraction = r.number("warningFraction");
    const nonFinite = r.oneOf("nonFinite", ["refuse", "skip"] as const);
    const count = r.integer("count", 0, Number.MAX_SAFE_INTEGER);
    const skipped = r.integer("skipped", 0, Number.MAX_SAFE_INTEGER);
    const grid = r.numbers("grid", { max: burnIn });
    const ready = r.raw("counts") !== null;
    const complete = grid.length === burnIn;
    if (fromReference && !complete) r.fail("grid", `must hold the ${burnIn} reference values`);
    if (!fromReference && grid.length !== Math.min(count, burnIn)) r.fail("grid", `must hold min(count, burnIn) = ${Math.min(count, burnIn)} values, got ${grid.length}`);
    if (ready !== complete) r.fail("counts", complete ? "must be an array once the grid is complete" : "must be null while the burn-in fills the grid");
    const tested = fromReference ? count : Math.max(0, count - burnIn);
    let counts: number[] | null = null;
    if (ready) {
      for (let k = 1; k < grid.length; k++) if ((grid[k] as number) < (grid[k - 1] as number)) r.fail("grid", "must be sorted once complete");
      counts = r.integers("counts", burnIn + 1, 0, tested);
      let total = 0;
      for (const c of counts) total += c;
      if (total > tested) r.fail("counts", `must sum to at most the ${tested} samples tested, got ${total}`);
    }
    const logValue = r.numberIn("logValue", -Number.MAX_VALUE, Number.MAX_VALUE);
    const lowestLog = r.numberIn("lowestLog", -Number.MAX_VALUE, 0);
    if (lowestLog > logValue) r.fail("lowestLog", "cannot exceed logValue");
    const lowestIndex = r.integer("lowestIndex", -1, count + skipped - 1);
    const shares = r.numbers("shares", 2);
    let shareSum = 0;
    for (const s of shares) {
      if (!(s >= 0)) r.fail("shares", "must be ≥ 0");
      shareSum += s;
    }
    if (Math.abs(shareSum - 1) > 1e-9) r.fail("shares", `must sum to 1, got ${shareSum}`);
    const random = RandomSource.restore(r.raw("random"));
    const test = buildFromSnapshot(ConformalMartingale.kind, () =>
      new ConformalMartingale(definedOnly<ConformalMartingaleOptions>({
        threshold, betting, epsilon, jump, direction, warningFraction, nonFinite,
        burnIn: fromReference ? undefined : burnIn,
        reference: fromReference ? grid : undefined,
      })),
    );
    if (!fromReference) {
      test.#grid.set(grid);
      test.#gridFill = grid.length;
      if (ready) test.#grid.sort();
    }
    test.#counts = counts === null ? null : RankCounts.from(counts);
    test.#logValue = logValue;
    test.#lowestLog = lowestLog;
    test.#lowestIndex = lowestIndex;
    test.#shares.set(shares);
    test.#count = count;
    test.#skipped = skipped;
    test.#random = random;
    return test;
  }

  /** Takes one finite sample at stream index i: fills the grid, or tests it and bets. */
  #step(x: number, i: number): void {
    this.#count += 1;
    const counts = this.#counts;
    if (counts === null) {
      this.#grid[this.#gridFill++] = x + 0; // −0 becomes 0, as through JSON
      if (this.#gridFill === this.#burnIn) {
        this.#grid.sort();
        this.#counts = new RankCounts(this.#burnIn + 1);
      }
      this.#lastP = null;
      return;
    }
    const a = this.#score(x);
    const n = counts.total;
    const atOrBelow = counts.below(a + 1);
    const greater = n - atOrBelow;
    const equal = atOrBelow - counts.below(a);
    const theta = 1 - this.#random.next(); // in (0, 1]
    const p = (greater + theta * (equal + 1)) / (n + 1);
    counts.add(a);
    this.#lastP = p;
    const betting = this.#betting;
    this.#logValue += betting === "jumper" ? jumperLogBet(p, this.#jump, this.#shares) : betting === "power" ? powerLogBet(p, this.#epsilon) : mixtureLogBet(p);
    if (this.#logValue < this.#lowestLog) {
      this.#lowestLog = this.#logValue;
      this.#lowestIndex = i;
    }
  }

  /** The nonconformity score of x: its bin b (grid values below x), as b, m − b or |2b − m|. */
  #score(x: number): number {
    const grid = this.#grid;
    const m = this.#gridFill;
    let lo = 0;
    let hi = m;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if ((grid[mid] as number) < x) lo = mid + 1;
      else hi = mid;
    }
    const b = lo;
    return this.#direction === "up" ? b : this.#direction === "down" ? m - b : Math.abs(2 * b - m);
  }

  #reading(i: number): ConformalReading {
    const statistic = this.value;
    const change = this.#logValue >= this.#logThreshold;
    const status = change ? "change" : statistic > this.#warningFraction * this.#threshold ? "warning" : "stable";
    const direction = this.#direction === "both" ? undefined : this.#direction;
    const onset = this.#logValue > 0 ? this.#lowestIndex + 1 : undefined;
    return { index: i, status, statistic, threshold: this.#threshold, direction, onset, skipped: this.#skipped, pValue: this.#lastP, logValue: this.#logValue };
  }
}
