import { CholeskyDecomposition, Matrix } from "ml-matrix";
import type { Vector } from "./vector.js";

/**
 * Whether the symmetric L × L matrix p (row-major) is positive definite in
 * floating point: its Cholesky factorisation (ml-matrix) finds every pivot
 * positive. Cost L³/6 multiply-adds; a non-finite entry makes it false.
 */
export function isPositiveDefinite(p: Vector, L: number): boolean {
  const m = new Matrix(L, L);
  for (let i = 0; i < L; i++) {
    for (let j = 0; j < L; j++) {
      const v = p[i * L + j] as number;
      if (!Number.isFinite(v)) return false;
      m.set(i, j, v);
    }
  }
  return new CholeskyDecomposition(m).isPositiveDefinite();
}
