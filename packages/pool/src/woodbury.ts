import { MAX_INCREMENT, MAX_STATE, type Refusal } from "./sherman-morrison.js";
import type { Vector } from "./vector.js";

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
 * S is solved by Cholesky (k × k); P is written from its upper triangle and
 * mirrored. Nothing is written unless every check passes.
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
): Refusal {
  // As in the Sherman–Morrison step, the checks and the long loops live in
  // separate small functions, which V8 compiles to much faster loops.
  const a = lambda === 1 ? 1 : Math.pow(lambda, -k);
  const ut = new Float64Array(k * L); // Uᵀ, row r = a·P h_r
  const uSum = scaledProducts(p, hRows, k, L, a, ut);
  const s = new Float64Array(k * k);
  chunkSystem(hRows, ut, k, L, lambda, s);
  if (!choleskyInPlace(s, k)) return "hPh-not-positive";
  const gt = ut.slice(); // becomes Gᵀ = S⁻¹ Uᵀ
  choleskySolveRows(s, k, gt, L);
  const gSum = absoluteSum(gt, gt.length);
  const eSum = absoluteSum(eRows, k * n);
  if (!(gSum * eSum <= MAX_INCREMENT)) return "gain-not-finite";
  let trace = 0;
  for (let i = 0; i < L; i++) trace += p[i * L + i] as number;
  if (!(a * trace + gSum * uSum <= MAX_STATE)) return "p-overflow";
  addGainTimesResiduals(beta, gt, eRows, k, L, n);
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

/** S = Λ⁻¹ + H U (k × k, symmetric), with 1/w_r = λ^(−(k−1−r)). */
function chunkSystem(hRows: Float64Array, ut: Float64Array, k: number, L: number, lambda: number, s: Float64Array): void {
  for (let r = 0; r < k; r++) {
    for (let q = r; q < k; q++) {
      let sum = 0;
      for (let i = 0; i < L; i++) sum += (hRows[r * L + i] as number) * (ut[q * L + i] as number);
      if (q === r) sum += lambda === 1 ? 1 : Math.pow(lambda, -(k - 1 - r));
      s[r * k + q] = sum;
      s[q * k + r] = sum;
    }
  }
}

function absoluteSum(values: Float64Array, length: number): number {
  let sum = 0;
  for (let i = 0; i < length; i++) sum += Math.abs(values[i] as number);
  return sum;
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

/**
 * Cholesky factorisation A = C Cᵀ of a symmetric k × k matrix in place (C in
 * the lower triangle). False when a pivot is not a finite positive number.
 */
export function choleskyInPlace(m: Float64Array, k: number): boolean {
  for (let j = 0; j < k; j++) {
    let d = m[j * k + j] as number;
    for (let t = 0; t < j; t++) d -= (m[j * k + t] as number) ** 2;
    if (!(d > 0 && d < Infinity)) return false;
    const c = Math.sqrt(d);
    m[j * k + j] = c;
    for (let i = j + 1; i < k; i++) {
      let v = m[i * k + j] as number;
      for (let t = 0; t < j; t++) v -= (m[i * k + t] as number) * (m[j * k + t] as number);
      m[i * k + j] = v / c;
    }
  }
  return true;
}

/** Solves (C Cᵀ) X = B in place for B of k rows × width columns, C from {@link choleskyInPlace}. */
export function choleskySolveRows(c: Float64Array, k: number, b: Float64Array, width: number): void {
  for (let r = 0; r < k; r++) {
    for (let t = 0; t < r; t++) {
      const f = c[r * k + t] as number;
      for (let i = 0; i < width; i++) b[r * width + i] = (b[r * width + i] as number) - f * (b[t * width + i] as number);
    }
    const d = c[r * k + r] as number;
    for (let i = 0; i < width; i++) b[r * width + i] = (b[r * width + i] as number) / d;
  }
  for (let r = k - 1; r >= 0; r--) {
    for (let t = r + 1; t < k; t++) {
      const f = c[t * k + r] as number;
      for (let i = 0; i < width; i++) b[r * width + i] = (b[r * width + i] as number) - f * (b[t * width + i] as number);
    }
    const d = c[r * k + r] as number;
    for (let i = 0; i < width; i++) b[r * width + i] = (b[r * width + i] as number) / d;
  }
}
