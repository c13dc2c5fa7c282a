import seedrandom from "seedrandom";
import { integerInRange, seedOption } from "./validate.js";
import { NonFiniteError, SampleError } from "./errors.js";
import { envelope, openSnapshot, type Snapshot } from "./snapshot.js";

/** The plain state of a {@link RandomSource}: the Alea generator's four words and a cached normal deviate. */
export interface RandomSourceState {
  seed: string;
  alea: { c: number; s0: number; s1: number; s2: number };
  spareNormal: number | null;
}

/**
 * A seeded source of random numbers whose whole state is plain data, so that a
 * component that draws from it restores and continues exactly.
 * Method: the Alea generator (Baagøe, 2010) as shipped by the seedrandom
 * package; 53-bit uniforms; normal deviates by the Box–Muller transform
 * (Box & Muller, 1958), the second deviate of each pair kept in the state.
 * @example
 * const a = new RandomSource(42);
 * const b = RandomSource.restore(JSON.parse(JSON.stringify(a.snapshot())));
 * a.next() === b.next(); // true
 */
export class RandomSource {
  static readonly kind = "leeway.core.random";
  static readonly version = 1;
  readonly #seed: string;
  #prng: seedrandom.StatefulPRNG<seedrandom.State.Alea>;
  #spareNormal: number | null = null;

  /** @param seed any finite number or non-empty string; equal seeds give equal streams. */
  constructor(seed: number | string) {
    this.#seed = String(seedOption("RandomSource", "seed", seed));
    this.#prng = seedrandom.alea(this.#seed, { state: true });
  }

  /** The seed this source was built from (as a string). */
  get seed(): string {
    return this.#seed;
  }

  /** A uniform number in [0, 1) with 53 random bits. */
  next(): number {
    return this.#prng.double();
  }

  /** A uniform number in [low, high). */
  uniform(low: number, high: number): number {
    finiteArgument("low", low);
    finiteArgument("high", high);
    return low + (high - low) * this.#prng.double();
  }

  /** A uniform integer in [0, n) for an integer n ≥ 1. */
  integer(n: number): number {
    integerInRange("RandomSource", "n", n, 1, Number.MAX_SAFE_INTEGER);
    return Math.floor(this.#prng.double() * n);
  }

  /** A normal deviate with the given mean and standard deviation (Box–Muller). */
  normal(mean = 0, sd = 1): number {
    finiteArgument("mean", mean);
    finiteArgument("sd", sd);
    return this.#normal(mean, sd);
  }

  /** {@link normal} on checked arguments. */
  #normal(mean: number, sd: number): number {
    if (this.#spareNormal !== null) {
      const z = this.#spareNormal;
      this.#spareNormal = null;
      return mean + sd * z;
    }
    let u = this.#prng.double();
    while (u === 0) u = this.#prng.double();
    const v = this.#prng.double();
    const r = Math.sqrt(-2 * Math.log(u));
    const angle = 2 * Math.PI * v;
    this.#spareNormal = r * Math.sin(angle);
    return mean + sd * r * Math.cos(angle);
  }

  /** An exponential deviate with the given rate (mean 1/rate), by inversion. */
  exponential(rate = 1): number {
    if (!(typeof rate === "number" && rate > 0 && rate < Infinity)) throw new SampleError("RandomSource", "rate", rate, "a finite number > 0");
    let u = this.#prng.double();
    while (u === 0) u = this.#prng.double();
    return -Math.log(u) / rate;
  }

  /** Fills `out` with normal deviates and returns it. */
  fillNormal(out: Float64Array, mean = 0, sd = 1): Float64Array {
    outArgument(out);
    finiteArgument("mean", mean);
    finiteArgument("sd", sd);
    for (let i = 0; i < out.length; i++) out[i] = this.#normal(mean, sd);
    return out;
  }

  /** Fills `out` with uniforms in [0, 1) and returns it. */
  fillUniform(out: Float64Array): Float64Array {
    outArgument(out);
    for (let i = 0; i < out.length; i++) out[i] = this.#prng.double();
    return out;
  }

  /**
   * A new, independent source derived from this one's seed and a label, for
   * components that need several streams (for example one per simulated sensor).
   * It does not advance this source.
   */
  derive(label: string | number): RandomSource {
    return new RandomSource(`${this.#seed}/${label}`);
  }

  /** The whole state as plain data. */
  snapshot(): Snapshot<RandomSourceState> {
    const { c, s0, s1, s2 } = this.#prng.state();
    return envelope(RandomSource.kind, RandomSource.version, { seed: this.#seed, alea: { c, s0, s1, s2 }, spareNormal: this.#spareNormal });
  }

  /** Rebuilds a source from {@link RandomSource.snapshot}; it continues exactly where the original was. */
  static restore(snapshot: unknown): RandomSource {
    const reader = openSnapshot(snapshot, RandomSource.kind, RandomSource.version);
    const seed = reader.string("seed");
    if (seed.length === 0) reader.fail("seed", "must be a non-empty string");
    const alea = reader.object("alea");
    // Alea keeps three fractions in [0, 1) and a carry below 2^32.
    const s0 = alea.numberIn("s0", 0, 1);
    const s1 = alea.numberIn("s1", 0, 1);
    const s2 = alea.numberIn("s2", 0, 1);
    const c = alea.integer("c", 0, 2 ** 32);
    const spareNormal = reader.numberOrNull("spareNormal");
    const source = new RandomSource(seed);
    source.#prng = seedrandom.alea("", { state: { c, s0, s1, s2 } });
    source.#spareNormal = spareNormal;
    return source;
  }
}

/** A numeric argument of a draw: a number (else E_SAMPLE naming it and its type) and finite (else E_NON_FINITE). */
function finiteArgument(parameter: string, x: unknown): void {
  if (typeof x !== "number") throw new SampleError("RandomSource", parameter, x, "a finite number");
  if (x - x !== 0) throw new NonFiniteError("RandomSource", parameter, x);
}

/** The array a fill writes into: a Float64Array (else E_SAMPLE naming out and its type). */
function outArgument(out: unknown): void {
  if (!(out instanceof Float64Array)) throw new SampleError("RandomSource", "out", out, "a Float64Array");
}
