import {
  NonFiniteError,
  OptionError,
  envelope,
  nonFiniteOption,
  numberInRange,
  requireNumber,
  requireNumbers,
  openSnapshot,
  optionsObject,
  positiveInteger,
  toPlainArray,
  type NonFinitePolicy,
  type Snapshot,
} from "@leeway/core";

/** The largest frame length and hop a {@link Framer} accepts. */
const MAX_FRAME = 2 ** 24;

/** Options of {@link Framer}. */
export interface FramerOptions {
  /** Samples per frame. */
  size: number;
  /** Samples from the start of one frame to the start of the next (default `size`); a hop above `size` leaves gaps. */
  hop?: number;
  /** Overlap as a fraction of the frame in [0, 1), instead of `hop`: hop = max(1, round(size·(1 − overlap))). */
  overlap?: number;
  /** What to do with NaN/±Infinity samples (default `"refuse"`). */
  nonFinite?: NonFinitePolicy;
}

/** The plain state of a {@link Framer}. */
export interface FramerState {
  size: number;
  hop: number;
  nonFinite: NonFinitePolicy;
  buffer: number[];
  discard: number;
  emitted: boolean;
  count: number;
  skipped: number;
  frames: number;
}

/**
 * Cuts a stream of samples into frames of `size` samples whose starts are
 * `hop` samples apart: hop < size overlaps the frames (hop = size/2 is 50 %
 * overlap), hop = size abuts them, hop > size keeps one frame per hop (for
 * example 1024-sample frames once per second from a 5 kHz stream: hop 5000).
 * Frame j holds samples [j·hop, j·hop + size) of the finite samples seen.
 * Method: block framing for short-time spectral analysis (common practice, no source).
 * @example
 * const framer = new Framer({ size: 4, hop: 2 });
 * [1, 2, 3].map((x) => framer.observe(x)); // [null, null, null]
 * Array.from(framer.observe(4) ?? []); // [1, 2, 3, 4]
 * framer.observe(5);
 * Array.from(framer.observe(6) ?? []); // [3, 4, 5, 6]
 */
export class Framer {
  static readonly kind = "leeway.signal.framer";
  static readonly version = 1;
  /** Samples per frame. */
  readonly size: number;
  /** Samples between frame starts. */
  readonly hop: number;
  readonly #nonFinite: NonFinitePolicy;
  readonly #buffer: Float64Array;
  #filled = 0; // samples of the next frame held in #buffer[0, filled)
  #discard = 0; // samples still to drop before the next frame starts (hop > size)
  #emitted = false; // #buffer holds a frame returned by the last call: shift before writing
  #count = 0;
  #skipped = 0;
  #frames = 0;

  constructor(options: FramerOptions) {
    const o = optionsObject<FramerOptions>("Framer", options, ["size", "hop", "overlap", "nonFinite"]);
    this.size = positiveInteger("Framer", "size", o.size, MAX_FRAME);
    if (o.hop !== undefined && o.overlap !== undefined) throw new OptionError("Framer", "overlap", o.overlap, "left out when hop is given (give hop or overlap, not both)");
    if (o.overlap !== undefined) {
      const overlap = numberInRange("Framer", "overlap", o.overlap, { min: 0, max: 1, maxExclusive: true });
      this.hop = Math.max(1, Math.round(this.size * (1 - overlap)));
    } else {
      this.hop = o.hop === undefined ? this.size : positiveInteger("Framer", "hop", o.hop, MAX_FRAME);
    }
    this.#nonFinite = nonFiniteOption("Framer", o.nonFinite);
    this.#buffer = new Float64Array(this.size);
  }

  /** Finite samples taken. */
  get count(): number {
    return this.#count;
  }
  /** Non-finite samples skipped under `nonFinite: "skip"`. */
  get skipped(): number {
    return this.#skipped;
  }
  /** Frames emitted so far. */
  get frames(): number {
    return this.#frames;
  }

  /**
   * Takes one sample; returns the completed frame (an internal buffer, valid
   * until the next call: copy it to keep it) or null. A non-number is refused
   * with E_SAMPLE; -0 is kept as 0 (a snapshot, being JSON, cannot tell them apart).
   */
  observe(x: number): Float64Array | null {
    if (!Number.isFinite(x)) {
      requireNumber("Framer", "x", x);
      if (this.#nonFinite === "skip") {
        this.#skipped++;
        return null;
      }
      throw new NonFiniteError("Framer", "x", x);
    }
    this.#count++;
    if (this.#emitted) this.#advance();
    if (this.#discard > 0) {
      this.#discard--;
      return null;
    }
    this.#buffer[this.#filled++] = x + 0; // -0 + 0 is 0
    if (this.#filled < this.size) return null;
    this.#emitted = true;
    this.#frames++;
    return this.#buffer;
  }

  /**
   * Takes every sample of `xs`, calling `onFrame(frame, frameIndex)` for each
   * completed frame (the frame is an internal buffer); returns the number of
   * frames emitted. Reaches the same state as calling observe on each sample.
   */
  observeMany(xs: Float64Array, onFrame: (frame: Float64Array, frameIndex: number) => void): number {
    requireNumbers("Framer", "xs", xs);
    let emitted = 0;
    for (let i = 0; i < xs.length; i++) {
      const frame = this.observe(xs[i] as number);
      if (frame !== null) {
        emitted++;
        onFrame(frame, this.#frames - 1);
      }
    }
    return emitted;
  }

  /** Drops the first hop samples of an emitted frame (or all of it and schedules a gap). */
  #advance(): void {
    this.#emitted = false;
    if (this.hop >= this.size) {
      this.#filled = 0;
      this.#discard = this.hop - this.size;
    } else {
      this.#buffer.copyWithin(0, this.hop, this.size);
      this.#filled = this.size - this.hop;
    }
  }

  /** The whole state as plain data. */
  snapshot(): Snapshot<FramerState> {
    return envelope(Framer.kind, Framer.version, {
      size: this.size,
      hop: this.hop,
      nonFinite: this.#nonFinite,
      buffer: toPlainArray(this.#buffer, this.#filled),
      discard: this.#discard,
      emitted: this.#emitted,
      count: this.#count,
      skipped: this.#skipped,
      frames: this.#frames,
    });
  }

  /** Rebuilds a framer from {@link Framer.snapshot}; it continues exactly. */
  static restore(snapshot: unknown): Framer {
    const r = openSnapshot(snapshot, Framer.kind, Framer.version);
    const size = r.integer("size", 1, MAX_FRAME);
    const hop = r.integer("hop", 1, MAX_FRAME);
    const nonFinite = r.oneOf("nonFinite", ["refuse", "skip"] as const);
    const buffer = r.numbers("buffer", { max: size });
    const discard = r.integer("discard", 0, Math.max(0, hop - size));
    const emitted = r.boolean("emitted");
    const count = r.integer("count", 0, Number.MAX_SAFE_INTEGER);
    const skipped = r.integer("skipped", 0, Number.MAX_SAFE_INTEGER);
    const frames = r.integer("frames", 0, Number.MAX_SAFE_INTEGER);
    // count alone fixes where the framer stands: frames emitted, samples held, samples still to drop
    const expected = framerLayout(count, size, hop);
    if (frames !== expected.frames) r.fail("frames", `must be ${expected.frames} after ${count} samples (size ${size}, hop ${hop}), got ${frames}`);
    if (emitted !== expected.emitted) r.fail("emitted", `must be ${expected.emitted} after ${count} samples (size ${size}, hop ${hop})`);
    if (buffer.length !== expected.filled) r.fail("buffer", `must hold ${expected.filled} samples after ${count} samples (size ${size}, hop ${hop}), got length ${buffer.length}`);
    if (discard !== expected.discard) r.fail("discard", `must be ${expected.discard} after ${count} samples (size ${size}, hop ${hop}), got ${discard}`);
    const framer = new Framer({ size, hop, nonFinite });
    framer.#buffer.set(buffer);
    framer.#filled = buffer.length;
    framer.#discard = discard;
    framer.#emitted = emitted;
    framer.#count = count;
    framer.#skipped = skipped;
    framer.#frames = frames;
    return framer;
  }
}

/**
 * Where a framer stands after `count` samples: frame j covers samples
 * [j·hop, j·hop + size), so the frames emitted are those that end by `count`;
 * the last of them is still held (emitted) when it ended exactly at `count`;
 * otherwise the next frame holds the samples since its start, or, when it has
 * not started (hop > size), that many samples are still to drop.
 */
function framerLayout(count: number, size: number, hop: number): { frames: number; filled: number; discard: number; emitted: boolean } {
  if (count < size) return { frames: 0, filled: count, discard: 0, emitted: false };
  const frames = Math.floor((count - size) / hop) + 1;
  if (count === (frames - 1) * hop + size) return { frames, filled: size, discard: 0, emitted: true };
  const nextStart = frames * hop;
  return count < nextStart ? { frames, filled: 0, discard: nextStart - count, emitted: false } : { frames, filled: count - nextStart, discard: 0, emitted: false };
}
