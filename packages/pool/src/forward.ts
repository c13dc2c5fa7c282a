import { activateInPlace, type Activation } from "./activation.js";
import type { HiddenLayer } from "./hidden-layer.js";
import type { Vector } from "./vector.js";

/**
 * Hidden activations h = g(W·z + b) of one scaled input z (length n) into h
 * (length L). Two rows of W per pass share the loads of z, and four partial
 * sums break the add-latency chain.
 */
export function hiddenForward(layer: HiddenLayer, activation: Activation, z: Float64Array, h: Float64Array): void {
  const n = layer.inputs;
  const L = layer.hidden;
  const w = layer.weights;
  const b = layer.biases;
  const n2 = n - (n % 2);
  let i = 0;
  for (; i + 1 < L; i += 2) {
    const r0 = i * n;
    const r1 = r0 + n;
    let s0 = 0;
    let s1 = 0;
    let t0 = 0;
    let t1 = 0;
    let j = 0;
    for (; j < n2; j += 2) {
      const z0 = z[j] as number;
      const z1 = z[j + 1] as number;
      s0 += (w[r0 + j] as number) * z0;
      s1 += (w[r0 + j + 1] as number) * z1;
      t0 += (w[r1 + j] as number) * z0;
      t1 += (w[r1 + j + 1] as number) * z1;
    }
    if (j < n) {
      s0 += (w[r0 + j] as number) * (z[j] as number);
      t0 += (w[r1 + j] as number) * (z[j] as number);
    }
    h[i] = (b[i] as number) + (s0 + s1);
    h[i + 1] = (b[i + 1] as number) + (t0 + t1);
  }
  if (i < L) {
    // the same even/odd partial sums as the rows above (and as the SIMD kernel's two lanes)
    const row = i * n;
    let s0 = 0;
    let s1 = 0;
    let j = 0;
    for (; j < n2; j += 2) {
      s0 += (w[row + j] as number) * (z[j] as number);
      s1 += (w[row + j + 1] as number) * (z[j + 1] as number);
    }
    if (j < n) s0 += (w[row + j] as number) * (z[j] as number);
    h[i] = (b[i] as number) + (s0 + s1);
  }
  activateInPlace(h, L, activation);
}

/**
 * The residual e = z − βᵀh (length n) of the output layer β (L × n, row-major),
 * and the mean squared error Σ e_j² / n, returned. Four rows of β per pass, so
 * that e is read and written once per four multiply-adds.
 */
export function outputResidual(beta: Vector, h: Float64Array, z: Float64Array, L: number, n: number, e: Float64Array): number {
  for (let j = 0; j < n; j++) e[j] = z[j] as number;
  const L4 = L - (L % 4);
  let i = 0;
  for (; i < L4; i += 4) {
    const h0 = h[i] as number;
    const h1 = h[i + 1] as number;
    const h2 = h[i + 2] as number;
    const h3 = h[i + 3] as number;
    const r0 = i * n;
    const r1 = r0 + n;
    const r2 = r1 + n;
    const r3 = r2 + n;
    for (let j = 0; j < n; j++) {
      e[j] = (e[j] as number) - (h0 * (beta[r0 + j] as number) + h1 * (beta[r1 + j] as number) + h2 * (beta[r2 + j] as number) + h3 * (beta[r3 + j] as number));
    }
  }
  for (; i < L; i++) {
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
