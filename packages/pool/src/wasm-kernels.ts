import { KERNELS_BASE64 } from "./wasm-binary.js";
import type { Dtype, Vector } from "./vector.js";

/** Which code runs the forward pass and the rank-one update of β. */
export type Kernel = "typescript" | "wasm-simd";

/** Every accepted kernel. */
export const KERNELS: readonly Kernel[] = ["typescript", "wasm-simd"];

type Forward = (w: number, b: number, z: number, h: number, L: number, n: number) => void;
type Residual = (beta: number, h: number, z: number, e: number, L: number, n: number) => number;
type RankOne = (beta: number, k: number, e: number, L: number, n: number) => void;
type GainUpdate = (beta: number, gt: number, e: number, sum: number, k: number, L: number, n: number) => void;

/**
 * Most rows of a chunk whose β update runs in the f64x2 kernel: 64, or fewer so that the chunk's
 * rows take no more memory than β (L·n values). Longer chunks run the TypeScript loop.
 */
export function kernelChunkRows(L: number, n: number): number {
  return Math.min(64, Math.floor((L * n) / (L + n)));
}

interface Exports {
  forward: Forward;
  residual: Residual;
  rankOne: RankOne;
  forward32: Forward;
  residual32: Residual;
  rankOne32: RankOne;
  gainUpdate: GainUpdate;
}

// The library's compile target has no DOM or Node types: the little of the
// WebAssembly JavaScript API used here, declared (W3C WebAssembly JS API).
interface WasmMemory {
  readonly buffer: ArrayBuffer;
}
type WasmModule = object;
declare const WebAssembly: {
  Module: new (bytes: Uint8Array) => WasmModule;
  Instance: new (module: WasmModule, imports: object) => { exports: object };
  Memory: new (descriptor: { initial: number }) => WasmMemory;
};

const BASE64 = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";

/** Bytes of a base64 text (RFC 4648), padding ignored. */
function fromBase64(text: string): Uint8Array {
  const clean = text.replace(/=+$/, "");
  const bytes = new Uint8Array(Math.floor((clean.length * 3) / 4));
  let bits = 0;
  let value = 0;
  let at = 0;
  for (const ch of clean) {
    value = (value << 6) | BASE64.indexOf(ch);
    bits += 6;
    if (bits >= 8) {
      bits -= 8;
      bytes[at++] = (value >> bits) & 0xff;
    }
  }
  return bytes;
}

let compiled: WasmModule | null = null;

function kernelModule(): WasmModule {
  if (compiled === null) compiled = new WebAssembly.Module(fromBase64(KERNELS_BASE64));
  return compiled;
}

/**
 * One model's WebAssembly memory and its SIMD kernels (packages/pool/wasm/kernels.wat):
 * W, b, β, z, h, e and k live in the memory as elements of the model's dtype,
 * and typed-array views onto it stand in for the model's arrays. For float64
 * state (f64x2 lanes) the kernels do the operations of the TypeScript
 * reference in the same order, so readings agree bit for bit, and the model
 * works on the views directly. For float32 state (f32x4 lanes) they compute
 * in float32, and the model copies z in and h, e out of the memory. The
 * memory never grows, so the views stay valid.
 */
export class WasmKernels {
  /** True for float32 state (f32x4 kernels). */
  readonly float32: boolean;
  readonly weights: Vector;
  readonly biases: Vector;
  readonly beta: Vector;
  readonly z: Vector;
  readonly h: Vector;
  readonly e: Vector;
  readonly k: Vector;
  readonly #at: { w: number; b: number; beta: number; z: number; h: number; e: number; k: number; gt: number; eRows: number; sum: number };
  readonly #forward: Forward;
  readonly #residual: Residual;
  readonly #rankOne: RankOne;
  readonly #gainUpdate: GainUpdate;
  readonly #gt: Float64Array; // a chunk's Gᵀ rows (float64 state only; empty for float32)
  readonly #eRows: Float64Array; // a chunk's residual rows
  readonly #L: number;
  readonly #n: number;

  constructor(L: number, n: number, weights: ArrayLike<number>, biases: ArrayLike<number>, dtype: Dtype = "float64") {
    const bytes = dtype === "float32" ? 4 : 8;
    const chunk = dtype === "float32" ? 0 : kernelChunkRows(L, n); // float32 chunks keep the TypeScript β update
    const sizes = { w: L * n, b: L, beta: L * n, z: n, h: L, e: n, k: L, gt: chunk * L, eRows: chunk * n, sum: chunk === 0 ? 0 : n };
    const at = { w: 0, b: 0, beta: 0, z: 0, h: 0, e: 0, k: 0, gt: 0, eRows: 0, sum: 0 };
    let offset = 0;
    for (const key of Object.keys(sizes) as (keyof typeof sizes)[]) {
      at[key] = offset;
      offset += Math.ceil((sizes[key] * bytes) / 16) * 16; // 16-byte aligned for v128 loads
    }
    const memory = new WebAssembly.Memory({ initial: Math.ceil(offset / 65536) || 1 });
    const run = new WebAssembly.Instance(kernelModule(), { env: { memory } }).exports as unknown as Exports;
    this.float32 = dtype === "float32";
    const view = (key: keyof typeof sizes): Vector => (this.float32 ? new Float32Array(memory.buffer, at[key], sizes[key]) : new Float64Array(memory.buffer, at[key], sizes[key]));
    this.weights = view("w");
    this.biases = view("b");
    this.beta = view("beta");
    this.z = view("z");
    this.h = view("h");
    this.e = view("e");
    this.k = view("k");
    this.#gt = new Float64Array(memory.buffer, at.gt, sizes.gt);
    this.#eRows = new Float64Array(memory.buffer, at.eRows, sizes.eRows);
    this.#gainUpdate = run.gainUpdate;
    this.weights.set(weights);
    this.biases.set(biases);
    this.#forward = this.float32 ? run.forward32 : run.forward;
    this.#residual = this.float32 ? run.residual32 : run.residual;
    this.#rankOne = this.float32 ? run.rankOne32 : run.rankOne;
    this.#at = at;
    this.#L = L;
    this.#n = n;
  }

  /** h = W·z + b (before the activation); for float64 as hiddenForward's sums. */
  forward(): void {
    const a = this.#at;
    this.#forward(a.w, a.b, a.z, a.h, this.#L, this.#n);
  }

  /** e = z − βᵀh; returns Σe²/n (for float64 as outputResidual). */
  residual(): number {
    const a = this.#at;
    return this.#residual(a.beta, a.h, a.z, a.e, this.#L, this.#n);
  }

  /**
   * β += G·E for a chunk of k rows (Gᵀ: k × L, E: k × n), as addGainTimesResiduals in woodbury.ts,
   * bit for bit; false (nothing done) for float32 state or more than {@link kernelChunkRows} rows.
   */
  gainUpdate(gt: Float64Array, eRows: Float64Array, k: number): boolean {
    if (k * this.#n > this.#eRows.length) return false;
    this.#gt.set(gt.subarray(0, k * this.#L));
    this.#eRows.set(eRows.subarray(0, k * this.#n));
    const a = this.#at;
    this.#gainUpdate(a.beta, a.gt, a.eRows, a.sum, k, this.#L, this.#n);
    return true;
  }

  /** β += k eᵀ with k in `this.k`; for float64 as addOuterProduct. */
  rankOne(): void {
    const a = this.#at;
    this.#rankOne(a.beta, a.k, a.e, this.#L, this.#n);
  }
}
