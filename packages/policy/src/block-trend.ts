import { envelope, openSnapshot, type Snapshot } from "@leeway/core";
import { WindowTrend } from "@leeway/stats";

/** What a {@link BlockTrend} knows after its latest complete block. */
export interface TrendEvidence {
  /** Blocks in the window. */
  blocks: number;
  /** One-sided Mann-Kendall z of the block means (positive: rising). */
  z: number;
  /** Two-sided Mann-Kendall p-value. */
  pValue: number;
  /** Theil-Sen slope, in σ per sample; null until a rule needed it since the latest block (it costs O(w²)). */
  slope: number | null;
  /** slope × the window's span in samples: the rise the trend explains, in σ; null while the slope is. */
  rise: number | null;
}

/** The plain state of a {@link BlockTrend}. */
export interface BlockTrendState {
  block: number;
  width: number;
  sum: number;
  filled: number;
  z: number;
  pValue: number;
  slope: number | null;
  lastMean: number;
  trend: Snapshot;
}

/**
 * A long, decimated trend window: samples are averaged in blocks of `block`,
 * and the block means go through a sliding Mann-Kendall test with a Theil-Sen
 * slope (Mann, 1945; Kendall, 1975; Sen, 1968). Decimation lets a window of a
 * few hundred points span hours, and averaging cuts the short-range
 * correlation of score streams that would make the test liberal.
 *
 * The slope costs O(w²) and is computed only when a decision needs it.
 *
 * @example
 * const t = new BlockTrend(10, 50);
 * for (let i = 0; i < 500; i++) t.observe(i * 0.001);
 * t.evidence.z > 3; // true
 */
export class BlockTrend {
  static readonly kind = "leeway.policy.block-trend";
  static readonly version = 1;
  readonly #block: number; // B: samples per block
  readonly #width: number; // w: blocks in the window
  #sum = 0;
  #filled = 0;
  #z = 0;
  #pValue = 1;
  #slope: number | null = null;
  #lastMean = 0; // the latest complete block's mean
  #trend: WindowTrend;

  constructor(block: number, width: number) {
    this.#block = block;
    this.#width = width;
    this.#trend = new WindowTrend({ width });
  }

  /** Adds one sample. Returns true when it completed a block (the evidence changed). */
  observe(x: number): boolean {
    this.#sum += x;
    this.#filled += 1;
    if (this.#filled < this.#block) return false;
    const mean = this.#sum / this.#block;
    this.#lastMean = mean;
    this.#sum = 0;
    this.#filled = 0;
    const reading = this.#trend.observe(mean);
    this.#z = Number.isFinite(reading.z) ? reading.z : 0;
    this.#pValue = Number.isFinite(reading.pValue) ? reading.pValue : 1;
    this.#slope = null;
    return true;
  }

  /** Blocks in the window. */
  get blocks(): number {
    return this.#trend.size;
  }

  /** The mean of the latest complete block (0 before the first). */
  get lastMean(): number {
    return this.#lastMean;
  }

  /** One-sided Mann-Kendall z (0 before two blocks). */
  get z(): number {
    return this.#z;
  }

  /**
   * The rise over the window in σ: Theil-Sen slope (per sample) × span in
   * samples. Computed on first use after each block (O(w²)) and kept; 0
   * below two blocks (a window of one point spans nothing).
   */
  get rise(): number {
    if (this.#trend.size < 2) return 0;
    if (this.#slope === null) this.#slope = this.#trend.slope() / this.#block;
    return this.#slope * (this.#trend.size - 1) * this.#block;
  }

  /** The latest evidence as a fresh plain object (slope and rise null unless {@link BlockTrend.rise} was needed since the last block). */
  get evidence(): TrendEvidence {
    const slope = this.#slope;
    const rise = slope === null ? null : slope * Math.max(0, this.#trend.size - 1) * this.#block;
    return { blocks: this.#trend.size, z: this.#z, pValue: this.#pValue, slope, rise };
  }

  /** The block means in the window, oldest first (a fresh array), in the units of the samples. */
  get means(): Float64Array {
    return this.#trend.values();
  }

  /** Samples taken since the latest complete block (0 right after a block completed). */
  get pending(): number {
    return this.#filled;
  }

  /** Forgets everything (a new reference, a new mode). */
  restart(): void {
    this.#sum = 0;
    this.#filled = 0;
    this.#z = 0;
    this.#pValue = 1;
    this.#slope = null;
    this.#lastMean = 0;
    this.#trend = new WindowTrend({ width: this.#width });
  }

  snapshot(): Snapshot<BlockTrendState> {
    return envelope(BlockTrend.kind, BlockTrend.version, {
      block: this.#block,
      width: this.#width,
      sum: this.#sum,
      filled: this.#filled,
      z: this.#z,
      pValue: this.#pValue,
      slope: this.#slope,
      lastMean: this.#lastMean,
      trend: this.#trend.snapshot() as Snapshot,
    });
  }

  /** Rebuilds a trend window; `block` and `width` must match the engine's settings. */
  static restore(snapshot: unknown, block: number, width: number): BlockTrend {
    const r = openSnapshot(snapshot, BlockTrend.kind, BlockTrend.version);
    r.integer("block", block, block);
    r.integer("width", width, width);
    const filled = r.integer("filled", 0, block - 1);
    const sum = r.number("sum");
    const z = r.number("z");
    const pValue = r.numberIn("pValue", 0, 1);
    const slope = r.numberOrNull("slope");
    const lastMean = r.number("lastMean");
    const trend = WindowTrend.restore(r.raw("trend"));
    const t = new BlockTrend(block, width);
    t.#sum = sum;
    t.#filled = filled;
    t.#z = z;
    t.#pValue = pValue;
    t.#slope = slope;
    t.#lastMean = lastMean;
    t.#trend = trend;
    return t;
  }
}
