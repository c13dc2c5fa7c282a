import { activateInPlace, type Activation } from "./activation.js";
import type { HiddenLayer } from "./hidden-layer.js";
import type { Vector } from "./vector.js";

/**
 * Hidden activations h = g(W·z + b) of one scaled input z (length n) into h
 * (length L). Four partial sums per row break the add-latency chain.
 */
export function hiddenForward(layer: HiddenLayer, activation: Activation, z: Float64Array, h: Float64Array): void {
  const n = layer.inputs;
  const L = layer.hidden;
  const w = layer.weights;
  const b = layer.biases;
  const n4 = n - (n % 4);
  for (let i = 0; i < L; i++) {
    const row = i * n;
    let s0 = 0;
    let s1 = 0;
    let s2 = 0;
    let s3 = 0;
    let j = 0;
    for (; j < n4; j += 4) {
      s0 += (w[row + j] as number) * (z[j] as number);
      s1 += (w[row + j + 1] as number) * (z[j + 1] as number);
      s2 += (w[row + j + 2] as number) * (z[j + 2] as number);
      s3 += (w[row + j + 3] as number) * (z[j + 3] as number);
    }
    for (; j < n; j++) s0 += (w[row + j] as number) * (z[j] as number);
    h[i] = (b[i] as number) + (s0 + s1 + s2 + s3);
  }
  activateInPlace(h, L, activation);
}

/**
 * The residual e = z − βᵀh (length n) of the output layer β (L × n, row-major),
 * and the mean squared error Σ e_j² / n, returned.
 */
export function outputResidual(beta: Vector, h: Float64Array, z: Float64Array, L: number, n: number, e: Float64Array): number {
  for (let j = 0; j < n; j++) e[j] = z[j] as number;
  for (let i = 0; i < L; i++) {
    const hi = h[i] as number;
    const row = i * n;
    for (let j = 0; j < n; j++) e[j] = (e[j] as number) - hi * (beta[row + j] as number);
  }
  let sum = 0;
  for (let j = 0; j < n; j++) {
    const v = e[j] as number;
    sum += v * v;
  }
  return sum / n;
}
