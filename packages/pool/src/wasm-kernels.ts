import { KERNELS_BASE64 } from "./wasm-binary.js";

/** Which code runs the forward pass and the rank-one update of β. */
export type Kernel = "typescript" | "wasm-simd";

/** Every accepted kernel. */
export const KERNELS: readonly Kernel[] = ["typescript", "wasm-simd"];

interface Exports {
  forward(w: number, b: number, z: number, h: number, L: number, n: number): void;
  residual(beta: number, h: number, z: number, e: number, L: number, n: number): number;
  rankOne(beta: number, k: number, e: number, L: number, n: number): void;
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
 * W, b, β, z, h, e and k live in the memory, and Float64Array views onto it
 * stand in for the model's arrays, so the TypeScript code around the kernels
 * reads and writes them as before. The memory never grows, so the views stay valid.
 */
export class WasmKernels {
  readonly weights: Float64Array;
  readonly biases: Float64Array;
  readonly beta: Float64Array;
  readonly z: Float64Array;
  readonly h: Float64Array;
  readonly e: Float64Array;
  readonly k: Float64Array;
  readonly #at: { w: number; b: number; beta: number; z: number; h: number; e: number; k: number };
  readonly #run: Exports;
  readonly #L: number;
  readonly #n: number;

  constructor(L: number, n: number, weights: ArrayLike<number>, biases: ArrayLike<number>) {
    const sizes = { w: L * n, b: L, beta: L * n, z: n, h: L, e: n, k: L };
    const at = { w: 0, b: 0, beta: 0, z: 0, h: 0, e: 0, k: 0 };
    let offset = 0;
    for (const key of Object.keys(sizes) as (keyof typeof sizes)[]) {
      at[key] = offset;
      offset += Math.ceil((sizes[key] * 8) / 16) * 16; // 16-byte aligned for v128 loads
    }
    const memory = new WebAssembly.Memory({ initial: Math.ceil(offset / 65536) || 1 });
    this.#run = new WebAssembly.Instance(kernelModule(), { env: { memory } }).exports as unknown as Exports;
    const view = (key: keyof typeof sizes): Float64Array => new Float64Array(memory.buffer, at[key], sizes[key]);
    this.weights = view("w");
    this.biases = view("b");
    this.beta = view("beta");
    this.z = view("z");
    this.h = view("h");
    this.e = view("e");
    this.k = view("k");
    this.weights.set(weights);
    this.biases.set(biases);
    this.#at = at;
    this.#L = L;
    this.#n = n;
  }

  /** h = W·z + b (before the activation), as hiddenForward's sums. */
  forward(): void {
    const a = this.#at;
    this.#run.forward(a.w, a.b, a.z, a.h, this.#L, this.#n);
  }

  /** e = z − βᵀh; returns Σe²/n, as outputResidual. */
  residual(): number {
    const a = this.#at;
    return this.#run.residual(a.beta, a.h, a.z, a.e, this.#L, this.#n);
  }

  /** β += k eᵀ with k in `this.k`, as addOuterProduct. */
  rankOne(): void {
    const a = this.#at;
    this.#run.rankOne(a.beta, a.k, a.e, this.#L, this.#n);
  }
}
