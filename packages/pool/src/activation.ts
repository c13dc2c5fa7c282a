/** The activation g of the hidden layer: h = g(W·z + b). */
export type Activation = "sigmoid" | "tanh" | "identity";

/** Every accepted activation, in the order used by option messages. */
export const ACTIVATIONS: readonly Activation[] = ["sigmoid", "tanh", "identity"];

/**
 * Applies g in place to the first `length` entries of `values`.
 * - sigmoid: g(s) = 1 / (1 + e^(−s)), values in (0, 1)
 * - tanh: g(s) = tanh(s), values in (−1, 1)
 * - identity: g(s) = s
 */
export function activateInPlace(values: Float64Array, length: number, activation: Activation): void {
  if (activation === "sigmoid") {
    for (let i = 0; i < length; i++) values[i] = 1 / (1 + Math.exp(-(values[i] as number)));
  } else if (activation === "tanh") {
    for (let i = 0; i < length; i++) values[i] = Math.tanh(values[i] as number);
  }
}
