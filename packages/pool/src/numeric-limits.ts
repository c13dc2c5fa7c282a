import type { Dtype } from "./vector.js";

/**
 * What the learnable state of a dtype can hold: `epsilon`, the spacing of its
 * numbers around 1 (2^−52 for float64, 2^−23 for float32); `stateLimit`, the
 * largest magnitude an entry of P may reach (far enough below the largest
 * finite value, 1.8e308 and 3.4e38, that sums of a few entries stay finite);
 * and `betaLimit`, the largest magnitude of an entry of β, about the square
 * root of that, so that a reconstruction error and its square (the score,
 * computed in float64) stay finite.
 */
export interface NumericLimits {
  readonly epsilon: number;
  readonly stateLimit: number;
  readonly betaLimit: number;
}

/** The limits of each dtype. */
export const LIMITS: Readonly<Record<Dtype, NumericLimits>> = {
  float64: { epsilon: 2 ** -52, stateLimit: 1e300, betaLimit: 1e150 },
  float32: { epsilon: 2 ** -23, stateLimit: 1e36, betaLimit: 1e18 },
};

/**
 * How many times the rounding noise of P's entries the curvature an update
 * leaves along h must exceed (see {@link gainIsSafe}).
 */
export const GAIN_SAFETY = 4;

/**
 * Whether a rank-one downdate P ← (P − u uᵀ/(λ + c))/λ, c = hᵀPh, keeps P
 * positive definite once its entries are rounded to the dtype. The new P has
 * hᵀP'h = c/(λ + c), so its curvature along h is c/((λ + c)·‖h‖²); rounding
 * each entry (at most maxDiag(P)/λ in size for a positive definite P) moves the
 * eigenvalues by up to about L·ε·maxDiag/λ (Weyl's inequality; Higham,
 * Accuracy and Stability of Numerical Algorithms, 2002, §2.2 — from memory).
 * The update is safe when the first exceeds the second {@link GAIN_SAFETY} times.
 */
export function gainIsSafe(c: number, hh: number, maxDiagonal: number, lambda: number, L: number, limits: NumericLimits): boolean {
  return c / ((lambda + c) * hh) >= (GAIN_SAFETY * L * limits.epsilon * maxDiagonal) / lambda;
}
