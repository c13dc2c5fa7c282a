import { CholeskyDecomposition, Matrix } from "ml-matrix";
import { gainIsSafe, type NumericLimits } from "./numeric-limits.js";
import type { Refusal } from "./sherman-morrison.js";
import type { Vector } from "./vector.js";

/** A kernel that does β += G·E exactly as {@link addGainTimesResiduals}, or declines (false). */
export interface GainKernel {
  gainUpdate(gt: Float64Array, eRows: Float64Array, k: number): boolean;
}

/**
 * The k-row OS-ELM update by the Woodbury identity (Liang et al. 2006, chunk
 * form; from memory), with exponential forgetting λ applied row by row so that
 * it equals k single {@link shermanMorrisonStep} calls. With a = λ^(−k),
 * P̃ = a·P, row weights w_r = λ^(k−1−r) (Λ = diag w) and H the k × L rows:
 *   U = P̃ Hᵀ                  (L × k)
 *   S = Λ⁻¹ + H U             (k × k, symmetric positive definite)
 *   G = U S⁻¹                 (the gain; equals P_new Hᵀ Λ)
 *   β ← β + G E,  E = T − Hβ  (E: k × n residuals before the update)
 *   P ← P̃ − G Uᵀ
 * S is solved by Cholesky (k × k, ml-matrix); P is written from its upper
 * triangle and mirrored. Nothing is written unless every check passes: S
 * positive definite, every row's gain safe against the starting P (a check
 * of the first step that later rows, meeting a smaller P, only approximate —
 * the periodic Cholesky check covers the rest), and no entry of β (at most `betaBound` in size now) or of
 * P could leave the dtype's range. Returns the refusal, or null and the most
 * any entry of β moved (in `moved[0]`). `addGain` (the model's SIMD kernels) may
 * do the β update instead of the TypeScript loop, with the same result.
 */
export function woodburyChunk(
  p: Vector,
  beta: Vector,
  hRows: Float64Array,
  eRows: Float64Array,
  k: number,
  L: number,
  n: number,
  lambda: number,
  limits: NumericLimits,
  betaBound: number,
  moved: Float64Array,
  addGain: GainKernel | null = null,
): Refusal {
  // As in the Sherman–Morrison step, the checks and the long loops live in
  // separate small functions, which V8 compiles to much faster loops.
  const a = lambda === 1 ? 1 : Math.pow(lambda, -k);
  const ut = new Float64Array(k * L); // Uᵀ, row r = a·P h_r
  const uSum = scaledProducts(p, hRows, k, L, a, ut);
  if (!(uSum < Infinity)) return "gain-not-finite";
  if (!rowGainsSafe(p, hRows, ut, k, L, a, limits)) return "gain-unsafe";
  const s = new Matrix(k, k);
  chunkSystem(hRows, ut, k, L, lambda, s);
  const cholesky = new CholeskyDecomposition(s);
  if (!cholesky.isPositiveDefinite()) return "hPh-not-positive";
  const gt = Float64Array.from(cholesky.solve(new Matrix(rowsOf(ut, k, L))).to1DArray()); // Gᵀ = S⁻¹ Uᵀ
  const gSum = absoluteSum(gt, gt.length);
  // |Σ_r G_ir E_rj| ≤ Σ_r |G_ir|·max|E| ≤ gSum·max|E|
  const increment = gSum * absoluteMax(eRows, k * n);
  if (!(increment < Infinity)) return "gain-not-finite";
  if (!(betaBound + increment <= limits.betaLimit)) return "beta-overflow";
  let trace = 0;
  for (let i = 0; i < L; i++) trace += p[i * L + i] as number;
  if (!(a * trace + gSum * uSum <= limits.stateLimit)) return "p-overflow";
  moved[0] = increment;
  if (addGain === null || !addGain.gainUpdate(gt, eRows, k)) addGainTimesResiduals(beta, gt, eRows, k, L, n);
  chunkDowndate(p, gt, ut, k, L, a);
  return null;
}

/** Uᵀ rows a·P h_r into ut; returns Σ|entries|. */
function scaledProducts(p: Vector, hRows: Float64Array, k: number, L: number, a: number, ut: Float64Array): number {
  let uSum = 0;
  for (let r = 0; r < k; r++) {
    const hr = r * L;
    for (let i = 0; i < L; i++) {
      const row = i * L;
      let sum = 0;
      for (let j = 0; j < L; j++) sum += (p[row + j] as number) * (hRows[hr + j] as number);
      const v = a * sum;
      ut[hr + i] = v;
      uSum += Math.abs(v);
    }
  }
  return uSum;
}

/** Each row's single-step gain check ({@link gainIsSafe}) against P̃ = a·P. */
function rowGainsSafe(p: Vector, hRows: Float64Array, ut: Float64Array, k: number, L: number, a: number, limits: NumericLimits): boolean {
  let maxDiagonal = 0;
  for (let i = 0; i < L; i++) maxDiagonal = Math.max(maxDiagonal, a * (p[i * L + i] as number));
  for (let r = 0; r < k; r++) {
    let c = 0;
    let hh = 0;
    for (let i = 0; i < L; i++) {
      const hi = hRows[r * L + i] as number;
      c += hi * (ut[r * L + i] as number);
      hh += hi * hi;
    }
    if (hh === 0 || !(c > 0) || !gainIsSafe(c, hh, maxDiagonal, 1, L, limits)) return false;
  }
  return true;
}

/** The k rows of a row-major k × L array as plain arrays (for ml-matrix). */
function rowsOf(values: Float64Array, k: number, L: number): number[][] {
  return Array.from({ length: k }, (_, r) => Array.from(values.subarray(r * L, (r + 1) * L)));
}

/** S = Λ⁻¹ + H U (k × k, symmetric), with 1/w_r = λ^(−(k−1−r)). */
function chunkSystem(hRows: Float64Array, ut: Float64Array, k: number, L: number, lambda: number, s: Matrix): void {
  for (let r = 0; r < k; r++) {
    for (let q = r; q < k; q++) {
      let sum = 0;
      for (let i = 0; i < L; i++) sum += (hRows[r * L + i] as number) * (ut[q * L + i] as number);
      if (q === r) sum += lambda === 1 ? 1 : Math.pow(lambda, -(k - 1 - r));
      s.set(r, q, sum);
      s.set(q, r, sum);
    }
  }
}

function absoluteSum(values: Float64Array, length: number): number {
  let sum = 0;
  for (let i = 0; i < length; i++) sum += Math.abs(values[i] as number);
  return sum;
}

function absoluteMax(values: Float64Array, length: number): number {
  let max = 0;
  let check = 0; // stays 0 unless a value is NaN or ±Infinity
  for (let i = 0; i < length; i++) {
    const v = Math.abs(values[i] as number);
    if (v > max) max = v;
    check += v * 0;
  }
  return check === 0 ? max : Infinity;
}

/** β ← β + G E, one row of β at a time: the k terms are summed in a small buffer, so β is read and written once. */
function addGainTimesResiduals(beta: Vector, gt: Float64Array, eRows: Float64Array, k: number, L: number, n: number): void {
  const sum = new Float64Array(n);
  for (let i = 0; i < L; i++) {
    sum.fill(0);
    let r = 0;
    // four residual rows per pass: sum is read and written once per four multiply-adds
    for (; r + 3 < k; r += 4) {
      const g0 = gt[r * L + i] as number;
      const g1 = gt[(r + 1) * L + i] as number;
      const g2 = gt[(r + 2) * L + i] as number;
      const g3 = gt[(r + 3) * L + i] as number;
      const e0 = r * n;
      const e1 = e0 + n;
      const e2 = e1 + n;
      const e3 = e2 + n;
      for (let j = 0; j < n; j++) {
        sum[j] = (sum[j] as number) + (g0 * (eRows[e0 + j] as number) + g1 * (eRows[e1 + j] as number) + g2 * (eRows[e2 + j] as number) + g3 * (eRows[e3 + j] as number));
      }
    }
    for (; r < k; r++) {
      const g = gt[r * L + i] as number;
      const er = r * n;
      for (let j = 0; j < n; j++) sum[j] = (sum[j] as number) + g * (eRows[er + j] as number);
    }
    const row = i * n;
    for (let j = 0; j < n; j++) beta[row + j] = (beta[row + j] as number) + (sum[j] as number);
  }
}

/** P ← a·P − G Uᵀ, upper triangle mirrored. */
function chunkDowndate(p: Vector, gt: Float64Array, ut: Float64Array, k: number, L: number, a: number): void {
  for (let i = 0; i < L; i++) {
    for (let j = i; j < L; j++) {
      let sum = 0;
      for (let r = 0; r < k; r++) sum += (gt[r * L + i] as number) * (ut[r * L + j] as number);
      const v = a * (p[i * L + j] as number) - sum;
      p[i * L + j] = v;
      p[j * L + i] = v;
    }
  }
}
