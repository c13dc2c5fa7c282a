import type { RandomSource } from "@leeway/core";

/**
 * An endless stream resampled from a reference sample by the moving-block bootstrap (Künsch, 1989):
 * blocks of `blockLength` consecutive reference values, each starting at a uniform position in
 * [0, n − blockLength], laid end to end, so that the dependence within a block is kept.
 */
export class BlockBootstrap {
  readonly #reference: Float64Array;
  readonly #blockLength: number;
  readonly #random: RandomSource;
  #position = 0; // next reference index to copy
  #left = 0; // values left in the current block

  constructor(reference: Float64Array, blockLength: number, random: RandomSource) {
    this.#reference = reference;
    this.#blockLength = blockLength;
    this.#random = random;
  }

  /** Fills `out[0..length)` with the next values of the stream. */
  fill(out: Float64Array, length = out.length): void {
    const ref = this.#reference;
    const starts = ref.length - this.#blockLength + 1;
    let pos = this.#position;
    let left = this.#left;
    for (let i = 0; i < length; ) {
      if (left === 0) {
        pos = this.#random.integer(starts);
        left = this.#blockLength;
      }
      const take = left < length - i ? left : length - i;
      for (let k = 0; k < take; k++) out[i + k] = ref[pos + k] as number;
      i += take;
      pos += take;
      left -= take;
    }
    this.#position = pos;
    this.#left = left;
  }
}
