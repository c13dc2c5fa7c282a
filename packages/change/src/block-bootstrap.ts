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
  #uniforms = new Float64Array(64); // block starts drawn in bulk

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
    // exactly the blocks this fill starts, their uniforms drawn at once
    const blocks = left >= length ? 0 : Math.ceil((length - left) / this.#blockLength);
    if (this.#uniforms.length < blocks) this.#uniforms = new Float64Array(blocks);
    const u = this.#uniforms;
    this.#random.fillUniform(blocks === u.length ? u : u.subarray(0, blocks));
    let next = 0;
    for (let i = 0; i < length; ) {
      if (left === 0) {
        pos = Math.floor((u[next++] as number) * starts);
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
