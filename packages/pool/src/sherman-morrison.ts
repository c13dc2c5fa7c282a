import { gainIsSafe, type NumericLimits } from "./numeric-limits.js";
import type { Vector } from "./vector.js";
import type { WasmKernels } from "./wasm-kernels.js";

/**
 * Why an update was refused (null: it was applied).
 * - "hidden-layer-zero": h = 0, nothing to learn (identity activation, all-zero input)
 * - "hPh-not-positive": hᵀPh ≤ 0 for h ≠ 0, so P is no longer positive definite
 * - "gain-unsafe": the update would leave less curvature along h than the dtype resolves
 * - "gain-not-finite": h, the gain or the residual is non-finite or absurdly large
 * - "beta-overflow": an entry of β could leave the dtype's range
 * - "p-overflow": an entry of P could leave the dtype's range
 */
export type Refusal = null | "hidden-layer-zero" | "hPh-not-positive" | "gain-unsafe" | "gain-not-finite" | "beta-overflow" | "p-overflow";

/** Every refusal reason, in a fixed order. */
export const REFUSALS = ["hidden-layer-zero", "hPh-not-positive", "gain-unsafe", "gain-not-finite", "beta-overflow", "p-overflow"] as const;

/** Scratch vectors and the outcome of the last update. */
export class UpdateWorkspace {
  /** u = P·h */
  readonly u: Float64Array;
  /** k = u / (λ + hᵀPh), the gain */
  readonly k: Float64Array;
  /** The forgetting factor actually applied by the last update. */
  appliedForgetting = 1;
  /** ‖h‖² and hᵀPh of the last prepared update. */
  hh = 0;
  c = 0;
  /** max_i |k_i| · max_j |e_j| of the last prepared update: the most any entry of β moves. */
  increment = 0;
  constructor(hidden: number) {
    this.u = new Float64Array(hidden);
    this.k = new Float64Array(hidden);
  }
}

/**
 * Forgetting factor that keeps trace(P) at most `bound` (bounded-trace
 * variable forgetting; Goodwin & Sin 1984, Adaptive Filtering Prediction and
 * Control, constant-trace algorithm; Åström & Wittenmark, Adaptive Control —
 * both from memory). With a = tr P, b = ‖Ph‖², c = hᵀPh the next trace is
 * t(λ) = (a − b/(λ + c))/λ; if t(λ) > bound, λ* solves
 * bound·λ² + (bound·c − a)·λ + (b − a·c) = 0 and the factor is min(1, max(λ, λ*)).
 */
export function boundedForgetting(lambda: number, a: number, b: number, c: number, bound: number): number {
  if ((a - b / (lambda + c)) / lambda <= bound) return lambda;
  const p = bound * c - a;
  const q = Math.max(0, a * c - b);
  const root = (-p + Math.sqrt(p * p + 4 * bound * q)) / (2 * bound);
  return Math.min(1, Math.max(lambda, root));
}

/**
 * One OS-ELM step for one row h and its residual e = t − βᵀh, by the
 * Sherman–Morrison formula with exponential forgetting λ (Liang et al. 2006;
 * Haykin, Adaptive Filter Theory, RLS — both from memory):
 *   u = P h,  c = hᵀu,  k = u / (λ + c)
 *   β ← β + k eᵀ
 *   P ← (P − u kᵀ) / λ
 * Only multiplications, additions and one division; P is written from its upper
 * triangle and mirrored, so it stays exactly symmetric. Nothing is written
 * unless h ≠ 0, c is a finite positive number, the gain is safe for the dtype
 * ({@link gainIsSafe}), and no entry of β (at most `betaBound` in size now) or
 * of P could leave the dtype's range; the refusal is returned instead.
 */
export function shermanMorrisonStep(
  p: Vector,
  beta: Vector,
  h: Float64Array,
  e: Float64Array,
  L: number,
  n: number,
  lambda: number,
  traceBound: number,
  limits: NumericLimits,
  betaBound: number,
  ws: UpdateWorkspace,
  wasm: WasmKernels | null = null,
): Refusal {
  // The checks and the two long loops live in separate functions: kept
  // together in one body, V8 compiled the loops about three times slower.
  const refusal = prepareGain(p, h, e, L, n, lambda, traceBound, limits, betaBound, ws);
  if (refusal !== null) return refusal;
  if (wasm === null) addOuterProduct(beta, ws.k, e, L, n);
  else {
    wasm.k.set(ws.k);
    wasm.rankOne();
  }
  symmetricDowndate(p, ws.u, ws.k, L, 1 / ws.appliedForgetting);
  return null;
}

/** u = P h, the applied forgetting factor, k = u/(λ + hᵀu) and the safety checks; writes only the workspace. */
function prepareGain(
  p: Vector,
  h: Float64Array,
  e: Float64Array,
  L: number,
  n: number,
  lambda: number,
  traceBound: number,
  limits: NumericLimits,
  betaBound: number,
  ws: UpdateWorkspace,
): Refusal {
  const u = ws.u;
  const k = ws.k;
  let c = 0; // hᵀPh
  let uu = 0; // ‖Ph‖²
  let hh = 0; // ‖h‖²
  let trace = 0;
  let maxDiagonal = 0;
  for (let i = 0; i < L; i++) {
    const row = i * L;
    let s = 0;
    for (let j = 0; j < L; j++) s += (p[row + j] as number) * (h[j] as number);
    u[i] = s;
    const hi = h[i] as number;
    c += hi * s;
    uu += s * s;
    hh += hi * hi;
    const d = p[row + i] as number;
    trace += d;
    if (d > maxDiagonal) maxDiagonal = d;
  }
  ws.hh = hh;
  ws.c = c;
  if (hh === 0) return "hidden-layer-zero";
  if (!(hh < Infinity && c < Infinity)) return "gain-not-finite";
  if (!(c > 0)) return "hPh-not-positive";
  const applied = lambda < 1 ? boundedForgetting(lambda, trace, uu, c, traceBound) : 1;
  if (!gainIsSafe(c, hh, maxDiagonal, applied, L, limits)) return "gain-unsafe";
  const inverse = 1 / (applied + c);
  let kSum = 0;
  let kMax = 0;
  let uSum = 0;
  for (let i = 0; i < L; i++) {
    const ui = u[i] as number;
    const ki = ui * inverse;
    k[i] = ki;
    const a = Math.abs(ki);
    kSum += a;
    if (a > kMax) kMax = a;
    uSum += Math.abs(ui);
  }
  let eMax = 0;
  let check = 0; // stays 0 unless a residual is NaN or ±Infinity
  for (let j = 0; j < n; j++) {
    const a = Math.abs(e[j] as number);
    if (a > eMax) eMax = a;
    check += a * 0;
  }
  const increment = check === 0 ? kMax * eMax : Infinity;
  if (!(increment < Infinity)) return "gain-not-finite";
  if (!(betaBound + increment <= limits.betaLimit)) return "beta-overflow";
  if (!((trace + uSum * kSum) / applied <= limits.stateLimit)) return "p-overflow";
  ws.appliedForgetting = applied;
  ws.increment = increment;
  return null;
}

/** β ← β + k eᵀ for β of L rows × n columns (inner loop unrolled by four). */
export function addOuterProduct(beta: Vector, k: Float64Array, e: Float64Array, L: number, n: number): void {
  const n4 = n - (n % 4);
  for (let i = 0; i < L; i++) {
    const ki = k[i] as number;
    const row = i * n;
    let j = 0;
    for (; j < n4; j += 4) {
      beta[row + j] = (beta[row + j] as number) + ki * (e[j] as number);
      beta[row + j + 1] = (beta[row + j + 1] as number) + ki * (e[j + 1] as number);
      beta[row + j + 2] = (beta[row + j + 2] as number) + ki * (e[j + 2] as number);
      beta[row + j + 3] = (beta[row + j + 3] as number) + ki * (e[j + 3] as number);
    }
    for (; j < n; j++) beta[row + j] = (beta[row + j] as number) + ki * (e[j] as number);
  }
}

/** P ← (P − u kᵀ)·scale, computed on the upper triangle and mirrored. */
function symmetricDowndate(p: Vector, u: Float64Array, k: Float64Array, L: number, scale: number): void {
  for (let i = 0; i < L; i++) {
    const ui = u[i] as number;
    const row = i * L;
    for (let j = i; j < L; j++) {
      const v = ((p[row + j] as number) - ui * (k[j] as number)) * scale;
      p[row + j] = v;
      p[j * L + i] = v;
    }
  }
}
