import { RandomSource } from "@leeway/core";
import { allocate, type Dtype, type Vector } from "./vector.js";

/**
 * The fixed random hidden layer of an extreme learning machine: h = g(W·z + b).
 * It is never learnt and never stored: it is drawn again from the seed, and a
 * checksum of the drawn values proves that the drawing matches the original.
 */
export interface HiddenLayer {
  readonly inputs: number;
  readonly hidden: number;
  /** W, hidden × inputs, row-major (row i holds the input weights of hidden unit i). */
  readonly weights: Vector;
  /** b, one bias per hidden unit. */
  readonly biases: Vector;
  /** 32-bit checksum of W and b as stored (see {@link hiddenChecksum}). */
  readonly checksum: number;
}

/**
 * Draws the hidden layer from a seed. Distribution (Huang, Zhu & Siew, 2006,
 * draw hidden parameters at random from any continuous distribution; the scale
 * here is this library's choice): W_ij ~ Normal(0, 1/n) so that an input of unit
 * RMS gives pre-activations of unit variance, b_i ~ Uniform(−1, 1). W is drawn
 * row by row first, then b, from `new RandomSource(seed)`. Without biases
 * (the identity activation) b is drawn and then set to 0, so that h = W·z is
 * linear and a layer with L ≥ n inputs can be inverted by the linear output layer.
 */
export function drawHiddenLayer(seed: string, inputs: number, hidden: number, dtype: Dtype, withBiases = true): HiddenLayer {
  const random = new RandomSource(seed);
  const weights = allocate(dtype, inputs * hidden);
  const biases = allocate(dtype, hidden);
  const sd = 1 / Math.sqrt(inputs);
  for (let i = 0; i < weights.length; i++) weights[i] = random.normal(0, sd);
  for (let i = 0; i < hidden; i++) {
    const bias = random.uniform(-1, 1);
    biases[i] = withBiases ? bias : 0;
  }
  return { inputs, hidden, weights, biases, checksum: hiddenChecksum(weights, biases) };
}

/**
 * A 32-bit FNV-1a hash (Fowler, Noll & Vo, 1991) over the two 32-bit words of
 * the float64 value of every weight and then every bias, as an unsigned integer.
 */
export function hiddenChecksum(weights: Vector, biases: Vector): number {
  const word = new Float64Array(1);
  const words = new Uint32Array(word.buffer);
  let hash = 0x811c9dc5; // FNV offset basis
  const mix = (values: Vector): void => {
    for (let i = 0; i < values.length; i++) {
      word[0] = values[i] as number;
      hash = Math.imul(hash ^ (words[0] as number), 0x01000193); // FNV prime
      hash = Math.imul(hash ^ (words[1] as number), 0x01000193);
    }
  };
  mix(weights);
  mix(biases);
  return hash >>> 0;
}
