import {
  DimensionError,
  OptionError,
  SampleError,
  StateError,
  SnapshotError,
  checkedSize,
  envelope,
  integerInRange,
  nonFiniteOption,
  numberInRange,
  oneOf,
  openSnapshot,
  optionsObject,
  positiveInteger,
  positiveNumber,
  seedOption,
  toPlainArray,
  MAX_SNAPSHOT_ELEMENTS,
  type NonFinitePolicy,
  type Snapshot,
} from "@leeway/core";
import { CholeskyDecomposition, Matrix } from "ml-matrix";
import { ACTIVATIONS, activateInPlace, type Activation } from "./activation.js";
import { hiddenForward, outputResidual } from "./forward.js";
import { drawHiddenLayer, type HiddenLayer } from "./hidden-layer.js";
import { scaleInto, scalingOption, standardizeFrom, type Scaling, type ScalingOption } from "./scaling.js";
import { LIMITS, type NumericLimits } from "./numeric-limits.js";
import { isPositiveDefinite } from "./positive-definite.js";
import { REFUSALS, shermanMorrisonStep, UpdateWorkspace, type Refusal } from "./sherman-morrison.js";
import { allocate, bytesPerElement, DTYPES, type Dtype, type Vector } from "./vector.js";
import { KERNELS, WasmKernels, type Kernel } from "./wasm-kernels.js";
import { woodburyChunk } from "./woodbury.js";

const COMPONENT = "OselmAutoencoder";
/** Largest accepted number of inputs n. */
export const MAX_INPUTS = 2 ** 20;
/** Largest accepted number of hidden units L (L² must fit a snapshot array). */
export const MAX_HIDDEN = 4096;
const LAYER = Symbol("hidden layer");
/** Internal: scores the input another model with the same hidden layer and scaling has just scored (see AutoencoderPool's sharedHiddenLayer). */
export const SCORE_SHARED = Symbol("score from a shared hidden layer");
/** Largest WebAssembly memory (bytes of W and β) the default SIMD kernels use; larger models run the TypeScript kernels. */
const MAX_WASM_BYTES = 256 * 2 ** 20;
/** Accepted updates between two Cholesky checks that P is still positive definite. */
export const CHECK_INTERVAL = 256;
/** Consecutive refused updates after which the next refused one re-anchors P. */
export const REANCHOR_AFTER = 8;
/** Why P was last re-anchored. */
const RESETS = ["not-positive-definite", "lost-resolution", "persistent-refusals"] as const;
type Reset = (typeof RESETS)[number];

/** Options of {@link OselmAutoencoder}. */
export interface OselmAutoencoderOptions {
  /** n, the length of every input vector (for example 256 spectrum bins). */
  inputs: number;
  /** L, the number of hidden units (for example 32). */
  hidden: number;
  /** Seed of the random hidden layer (a finite number or a non-empty string). */
  seed: number | string;
  /** g of the hidden layer; default "sigmoid". */
  activation?: Activation;
  /** Ridge δ = 1/C added to the Gram matrix: P = (HᵀH + δI)⁻¹, in [1e-15, 1e15]; default 0.01. */
  ridge?: number;
  /** Forgetting factor λ in (0, 1]; 1 (default) weighs every sample equally, λ < 1 weighs a sample learnt m steps ago by λ^m (memory ≈ 1/(1 − λ) samples). */
  forgetting?: number;
  /** Bound on trace(P) enforced by variable forgetting when λ < 1; default L/δ, the trace of the prior P = I/δ. */
  traceBound?: number;
  /** Element type of β and P (and of the hidden weights); default "float64". */
  dtype?: Dtype;
  /** Input scaling; default "none". */
  scaling?: ScalingOption;
  /** "refuse" (default) or "skip" non-finite samples in learn, learnChunk and fit; score always refuses them. */
  nonFinite?: NonFinitePolicy;
  /**
   * The code of the forward pass and of β's updates: "wasm-simd"
   * (WebAssembly SIMD kernels: f64x2 for float64 state, 2.8–3.3× faster;
   * f32x4 for float32 state, about 4× faster; the default with L·n up to
   * 2²⁴) or "typescript" (the reference; the default for larger models).
   * The f64x2 kernels do the reference's operations in the same order, so
   * readings agree bit for bit; the f32x4 ones compute in float32 (losses
   * within about 1e-4 of the mean squared input of the reference's) and
   * refuse inputs beyond float32's range as samples (E_SAMPLE).
   * Chosen at construction and kept in the snapshot.
   */
  kernel?: Kernel;
}

/** The learning options of a model with every default filled in. */
export interface LearningOptions {
  activation: Activation;
  ridge: number;
  forgetting: number;
  traceBound: number;
  dtype: Dtype;
}

/**
 * Validates activation, ridge, forgetting, traceBound and dtype for a model of
 * L hidden units and fills in their defaults: the one check that both
 * {@link OselmAutoencoder} and the pool's member options go through.
 */
export function learningOptions(component: string, o: Partial<LearningOptions>, L: number): LearningOptions {
  const activation = o.activation === undefined ? "sigmoid" : oneOf(component, "activation", o.activation, ACTIVATIONS);
  // 1/δ is the prior P, so δ is kept where 1/δ is a normal float32 number
  const ridge = o.ridge === undefined ? 0.01 : numberInRange(component, "ridge", o.ridge, { min: 1e-15, max: 1e15 });
  const forgetting = o.forgetting === undefined ? 1 : numberInRange(component, "forgetting", o.forgetting, { min: 0, max: 1, minExclusive: true });
  const traceBound = o.traceBound === undefined ? L / ridge : positiveNumber(component, "traceBound", o.traceBound);
  if (!(traceBound < Infinity)) throw new OptionError(component, "traceBound", o.traceBound, "a finite number > 0 (hidden/ridge is too large)");
  const dtype = o.dtype === undefined ? "float64" : oneOf(component, "dtype", o.dtype, DTYPES);
  return { activation, ridge, forgetting, traceBound, dtype };
}

/** What {@link OselmAutoencoder.health} reports. */
export interface AutoencoderHealth {
  /** Rows learnt (fit rows plus sequential updates). */
  count: number;
  /** Non-finite samples skipped under nonFinite: "skip". */
  skipped: number;
  /** Updates refused with E_STATE (the state stayed as it was). */
  refused: number;
  /** Why the last refused update was refused, or null. */
  lastRefusal: string | null;
  /** Updates whose forgetting factor was raised to hold trace(P) at its bound. */
  windupLimited: number;
  /** Times P was re-anchored to a ridge prior (β kept), and why the last time, or null. */
  resets: number;
  lastReset: string | null;
  /** The last Cholesky check (on restore, after fit, every 256 accepted updates) found P positive definite. */
  positiveDefinite: boolean;
  /** trace(P) now, and its bound. */
  trace: number;
  traceBound: number;
  /** Smallest diagonal entry of P (must be > 0). */
  minDiagonal: number;
  /** Largest |P_ij − P_ji| (0 by construction). */
  maxAsymmetry: number;
  /** Every entry of β and P is finite. */
  finite: boolean;
  /** finite, symmetric, positive diagonal, positive definite at the last check and trace within its bound (when λ < 1). */
  ok: boolean;
}

/** The plain state in a snapshot of {@link OselmAutoencoder}. */
export interface OselmAutoencoderState {
  inputs: number;
  hidden: number;
  activation: Activation;
  ridge: number;
  forgetting: number;
  traceBound: number;
  dtype: Dtype;
  nonFinite: NonFinitePolicy;
  kernel: Kernel;
  seed: string;
  hiddenChecksum: number;
  scaling: Scaling["mode"];
  offset: number[] | null;
  scale: number[] | null;
  fitted: boolean;
  count: number;
  skipped: number;
  refused: number;
  windupLimited: number;
  lastRefusal: string | null;
  resets: number;
  lastReset: string | null;
  /** Consecutive refused updates just before the snapshot. */
  refusalRun: number;
  /** Accepted updates since the last Cholesky check of P. */
  sinceCheck: number;
  /** β, L × n row-major. */
  beta: number[];
  /** The upper triangle of P, row by row (L(L+1)/2 numbers). */
  p: number[];
}

interface InternalOptions extends OselmAutoencoderOptions {
  [LAYER]?: HiddenLayer;
}

/**
 * An autoencoder that learns one sample at a time: a random hidden layer
 * h = g(W·z + b) and output weights β (L × n) fitted by regularized recursive
 * least squares so that βᵀh reconstructs z. Method: OS-ELM (Liang, Huang,
 * Saratchandran & Sundararajan, 2006, IEEE TNN 17(6)) with the regularized start
 * P₀ = (H₀ᵀH₀ + δI)⁻¹ (Huynh & Won, 2011), the batch-one Sherman–Morrison update,
 * the chunk Woodbury update, exponential forgetting (Haykin, Adaptive Filter
 * Theory, RLS) and a bounded-trace variable forgetting factor against covariance
 * wind-up (Goodwin & Sin, 1984). The score is the mean squared reconstruction
 * error in scaled units.
 * @example
 * const model = new OselmAutoencoder({ inputs: 3, hidden: 4, activation: "identity", ridge: 1e-9, seed: 1 });
 * model.fit([Float64Array.of(1, 0, 0), Float64Array.of(0, 1, 0), Float64Array.of(0, 0, 1)]);
 * model.score(Float64Array.of(-2, 0.5, 7)) < 1e-6; // true: a linear layer with L ≥ n reconstructs any input
 */
export class OselmAutoencoder {
  static readonly kind = "leeway.pool.oselm-autoencoder";
  static readonly version = 3;

  readonly #n: number;
  readonly #L: number;
  readonly #activation: Activation;
  readonly #ridge: number; // δ = 1/C
  readonly #forgetting: number; // λ
  readonly #traceBound: number;
  readonly #dtype: Dtype;
  readonly #limits: NumericLimits;
  readonly #nonFinite: NonFinitePolicy;
  readonly #seed: string;
  readonly #layer: HiddenLayer;
  readonly #wasm: WasmKernels | null;
  #scaling: Scaling;
  #fitted: boolean;
  #beta: Vector;
  #p: Vector;
  #count = 0;
  #skipped = 0;
  #refused = 0;
  #windupLimited = 0;
  #lastRefusal: string | null = null;
  #resets = 0;
  #lastReset: Reset | null = null;
  #refusalRun = 0;
  #sinceCheck = 0;
  #positiveDefinite = true;
  /** An upper bound on max |β_ij|, exact after fit, restore and every recomputation. */
  #betaBound = 0;
  #betaBoundExact = true;
  #scored = false;
  readonly #z: Float64Array;
  readonly #h: Float64Array;
  readonly #e: Float64Array;
  readonly #ws: UpdateWorkspace;
  readonly #moved = new Float64Array(1);

  constructor(options: OselmAutoencoderOptions) {
    const o = optionsObject<InternalOptions>(COMPONENT, options, [
      "inputs", "hidden", "seed", "activation", "ridge", "forgetting", "traceBound", "dtype", "scaling", "nonFinite", "kernel",
    ]);
    if (o.inputs === undefined) throw new OptionError(COMPONENT, "inputs", undefined, `an integer in [1, ${MAX_INPUTS}]`);
    this.#n = positiveInteger(COMPONENT, "inputs", o.inputs, MAX_INPUTS);
    this.#L = integerInRange(COMPONENT, "hidden", o.hidden, 1, MAX_HIDDEN);
    if (this.#n * this.#L > MAX_SNAPSHOT_ELEMENTS) {
      throw new OptionError(COMPONENT, "hidden", o.hidden, `at most ${Math.floor(MAX_SNAPSHOT_ELEMENTS / this.#n)} for ${this.#n} inputs (L·n ≤ ${MAX_SNAPSHOT_ELEMENTS})`);
    }
    this.#seed = String(seedOption(COMPONENT, "seed", o.seed));
    const learning = learningOptions(COMPONENT, o, this.#L);
    this.#activation = learning.activation;
    this.#ridge = learning.ridge;
    this.#forgetting = learning.forgetting;
    this.#traceBound = learning.traceBound;
    this.#dtype = learning.dtype;
    this.#limits = LIMITS[this.#dtype];
    this.#nonFinite = nonFiniteOption(COMPONENT, o.nonFinite);
    this.#scaling = scalingOption(COMPONENT, o.scaling, this.#n);
    this.#fitted = this.#scaling.mode !== "standardize";
    this.#layer = o[LAYER] ?? drawHiddenLayer(this.#seed, this.#n, this.#L, this.#dtype, this.#activation !== "identity");
    // default: the SIMD kernels (float64: ≥ 2× faster, same readings; float32: faster than float64) where the arrays fit a modest WebAssembly memory
    const bytes = bytesPerElement(this.#dtype);
    const simdFits = 2 * this.#L * this.#n * bytes <= MAX_WASM_BYTES;
    const kernel = o.kernel === undefined ? (simdFits ? "wasm-simd" : "typescript") : oneOf(COMPONENT, "kernel", o.kernel, KERNELS);
    if (kernel === "wasm-simd" && !simdFits) throw new OptionError(COMPONENT, "kernel", kernel, `"typescript" for L·n above ${MAX_WASM_BYTES / (2 * bytes)} with ${this.#dtype} state (the SIMD kernels keep W and β in one WebAssembly memory of at most ${MAX_WASM_BYTES} bytes)`);
    const wasm = kernel === "wasm-simd" ? new WasmKernels(this.#L, this.#n, this.#layer.weights, this.#layer.biases, this.#dtype) : null;
    this.#wasm = wasm;
    this.#beta = wasm === null ? allocate(this.#dtype, this.#L * this.#n) : wasm.beta;
    this.#p = allocate(this.#dtype, this.#L * this.#L);
    this.#resetPrior();
    // float64 kernels work on the WebAssembly buffers themselves; float32 ones copy z in and h, e out
    const shared = wasm !== null && !wasm.float32;
    this.#z = shared ? (wasm.z as Float64Array) : new Float64Array(this.#n);
    this.#h = shared ? (wasm.h as Float64Array) : new Float64Array(this.#L);
    this.#e = shared ? (wasm.e as Float64Array) : new Float64Array(this.#n);
    this.#ws = new UpdateWorkspace(this.#L);
  }

  /** n, the input length. */
  get inputs(): number {
    return this.#n;
  }
  /** L, the number of hidden units. */
  get hidden(): number {
    return this.#L;
  }
  /** Element type of the learnable state. */
  get dtype(): Dtype {
    return this.#dtype;
  }
  /** λ, the forgetting factor. */
  get forgetting(): number {
    return this.#forgetting;
  }
  /** Rows learnt so far (fit rows plus sequential updates). */
  get count(): number {
    return this.#count;
  }
  /** Non-finite samples skipped. */
  get skipped(): number {
    return this.#skipped;
  }
  /** False only for "standardize" scaling before `fit`: nothing can be scored or learnt yet. */
  get ready(): boolean {
    return this.#fitted;
  }

  /**
   * Batch training by regularized least squares over `rows` (ml-matrix
   * Cholesky): P = (HᵀH + δI)⁻¹, β = P·HᵀZ, replacing whatever was learnt.
   * With "standardize" scaling the offsets and scales are learnt from the
   * same rows first. Returns the number of rows used.
   */
  fit(rows: readonly ArrayLike<number>[]): number {
    if (!Array.isArray(rows) || rows.length === 0) throw new OptionError(COMPONENT, "rows", rows, "a non-empty array of input vectors");
    const raw: Float64Array[] = [];
    let skipped = 0;
    for (let r = 0; r < rows.length; r++) {
      const copy = new Float64Array(this.#n);
      if (scaleInto(COMPONENT, `rows[${r}]`, rows[r] as ArrayLike<number>, copy, NO_SCALING, this.#nonFinite === "refuse")) raw.push(copy);
      else skipped++;
    }
    if (raw.length === 0) throw new StateError(COMPONENT, "fit found no finite row to learn from");
    let scaling = this.#scaling;
    if (scaling.mode === "standardize") {
      if (raw.length < 2) throw new StateError(COMPONENT, `"standardize" scaling needs at least 2 finite rows in fit, got ${raw.length}`);
      scaling = { mode: "standardize", ...standardizeFrom(raw, this.#n) };
    }
    const L = this.#L;
    const n = this.#n;
    const hRows = new Matrix(raw.length, L);
    const zRows = new Matrix(raw.length, n);
    const z = new Float64Array(n);
    const h = new Float64Array(L);
    for (let r = 0; r < raw.length; r++) {
      scaleInto(COMPONENT, "rows", raw[r] as Float64Array, z, scaling, true);
      hiddenForward(this.#layer, this.#activation, z, h);
      for (let i = 0; i < L; i++) hRows.set(r, i, h[i] as number);
      for (let j = 0; j < n; j++) zRows.set(r, j, z[j] as number);
    }
    // A = HᵀH + δI, formed symmetric
    const gram = new Matrix(L, L);
    for (let i = 0; i < L; i++) {
      for (let j = i; j < L; j++) {
        let s = 0;
        for (let r = 0; r < raw.length; r++) s += hRows.get(r, i) * hRows.get(r, j);
        if (i === j) s += this.#ridge;
        gram.set(i, j, s);
        gram.set(j, i, s);
      }
    }
    const cholesky = new CholeskyDecomposition(gram);
    if (!cholesky.isPositiveDefinite()) throw new StateError(COMPONENT, "fit: HᵀH + ridge·I is not positive definite in floating point; raise ridge");
    const p = cholesky.solve(Matrix.eye(L, L));
    // β from the factor itself (A β = HᵀZ), not as P·HᵀZ: multiplying by the
    // explicit inverse loses about cond(A)·‖P‖‖HᵀZ‖/‖β‖ digits to cancellation
    const beta = cholesky.solve(hRows.transpose().mmul(zRows));
    const newP = allocate(this.#dtype, L * L);
    const newBeta = allocate(this.#dtype, L * n);
    for (let i = 0; i < L; i++) {
      for (let j = i; j < L; j++) {
        const v = 0.5 * (p.get(i, j) + p.get(j, i));
        newP[i * L + j] = v;
        newP[j * L + i] = v;
      }
      for (let j = 0; j < n; j++) newBeta[i * n + j] = beta.get(i, j);
    }
    if (!allFinite(newP) || !allFinite(newBeta)) throw new StateError(COMPONENT, "fit produced non-finite output weights; the state was left unchanged");
    const range = stateRangeProblem(newBeta, newP, L, this.#limits);
    if (range !== null) throw new StateError(COMPONENT, `fit: ${range} (the rows are too large for the ${this.#dtype} state: scale the inputs or raise ridge); the state was left unchanged`);
    if (scaling.scale !== null && !allFinite(scaling.scale)) throw new StateError(COMPONENT, "fit: a standard deviation of the rows overflows; the state was left unchanged");
    this.#p = newP;
    this.#beta.set(newBeta);
    this.#scaling = scaling;
    this.#fitted = true;
    this.#count = raw.length;
    this.#skipped += skipped;
    this.#refused = 0;
    this.#windupLimited = 0;
    this.#lastRefusal = null;
    this.#resets = 0;
    this.#lastReset = null;
    this.#refusalRun = 0;
    this.#sinceCheck = 0;
    this.#positiveDefinite = isPositiveDefinite(newP, L);
    this.#measureBeta();
    this.#scored = false;
    return raw.length;
  }

  /**
   * Mean squared reconstruction error (1/n)·Σ_j (z_j − (βᵀh)_j)² of one input,
   * in scaled units. Refuses a wrong length (E_DIMENSION) and non-finite values (E_NON_FINITE).
   */
  score(x: ArrayLike<number>): number {
    this.#requireReady("score");
    this.#scored = false;
    scaleInto(COMPONENT, "x", x, this.#z, this.#scaling, true);
    const loss = this.#forwardResidual();
    if (!(loss < Infinity)) throw overflowError(x);
    this.#scored = true;
    return loss;
  }

  /**
   * Internal (AutoencoderPool with sharedHiddenLayer): the score of the input
   * that `source` — a model with the same hidden layer and scaling — has just
   * scored, reusing its scaled input and hidden activations. Equal to `score(x)` bit for bit.
   */
  [SCORE_SHARED](source: OselmAutoencoder): number {
    this.#z.set(source.#z);
    this.#h.set(source.#h);
    this.#scored = false;
    const loss = this.#residual();
    if (!(loss < Infinity)) throw overflowError(this.#z);
    this.#scored = true;
    return loss;
  }

  /**
   * Learns one input by the Sherman–Morrison step and returns its loss before
   * the update. Returns NaN (and counts it) for a skipped non-finite sample
   * under nonFinite: "skip". Throws StateError (E_STATE) and keeps the
   * previous state when the update is numerically unsafe.
   */
  learn(x: ArrayLike<number>): number {
    this.#requireReady("learn");
    this.#scored = false;
    if (!scaleInto(COMPONENT, "x", x, this.#z, this.#scaling, this.#nonFinite === "refuse")) {
      this.#skipped++;
      return Number.NaN;
    }
    const loss = this.#forwardResidual();
    // an input whose squared error overflows is refused before anything changes
    if (!(loss < Infinity)) throw overflowError(x);
    this.#update();
    return loss;
  }

  /**
   * Learns the input most recently passed to {@link score}, reusing its hidden
   * activations and residual (about half the work of `learn`). Valid only
   * directly after `score`; anything else in between makes it an E_STATE error.
   * Returns the loss `score` returned.
   */
  learnScored(): number {
    if (!this.#scored) throw new StateError(COMPONENT, "learnScored needs a score(x) call directly before it");
    this.#scored = false;
    let sum = 0;
    for (let j = 0; j < this.#n; j++) sum += (this.#e[j] as number) ** 2;
    this.#update();
    return sum / this.#n;
  }

  /**
   * Learns k rows at once by the Woodbury identity (one k × k Cholesky solve;
   * for k = 1 the Sherman–Morrison step); the result equals k calls of `learn` in order.
   * A chunk that would overflow β or P is refused whole (E_STATE, state
   * unchanged); one whose gain check or Cholesky factor fails is learnt row by
   * row, with the guards and recovery of `learn` (rows before a refused one
   * stay learnt). With λ < 1, when the trace
   * bound could bind inside the chunk (trace(P)·λ^(−k) above it), the rows are
   * learnt one by one instead so that the bound is applied exactly as `learn`
   * does. Returns the number of rows learnt.
   */
  learnChunk(rows: readonly ArrayLike<number>[]): number {
    this.#requireReady("learnChunk");
    this.#scored = false;
    if (!Array.isArray(rows)) throw new OptionError(COMPONENT, "rows", rows, "an array of input vectors");
    const n = this.#n;
    const L = this.#L;
    const zRows = new Float64Array(rows.length * n);
    let k = 0;
    let skipped = 0;
    for (let r = 0; r < rows.length; r++) {
      const z = zRows.subarray(k * n, (k + 1) * n);
      if (scaleInto(COMPONENT, `rows[${r}]`, rows[r] as ArrayLike<number>, z, this.#scaling, this.#nonFinite === "refuse")) k++;
      else skipped++;
    }
    this.#skipped += skipped;
    if (k === 0) return 0;
    // one row: Woodbury with k = 1 is the Sherman–Morrison step
    if (k === 1 || (this.#forgetting < 1 && this.#trace() * Math.pow(this.#forgetting, -k) > this.#traceBound)) {
      for (let r = 0; r < k; r++) {
        this.#z.set(zRows.subarray(r * n, (r + 1) * n));
        if (!(this.#forwardResidual() < Infinity)) throw overflowError(this.#z, `rows (the ${r + 1}th finite row; the rows before it are learnt)`);
        this.#update();
      }
      return k;
    }
    const hRows = new Float64Array(k * L);
    const eRows = new Float64Array(k * n);
    // the forward passes run on the model's own buffers (views into the chunk
    // arrays made the loops markedly slower), then the rows are copied out
    for (let r = 0; r < k; r++) {
      this.#z.set(zRows.subarray(r * n, (r + 1) * n));
      if (!(this.#forwardResidual() < Infinity)) throw overflowError(this.#z, `rows (the ${r + 1}th finite row; nothing was learnt)`);
      hRows.set(this.#h, r * L);
      eRows.set(this.#e, r * n);
    }
    let refusal = woodburyChunk(this.#p, this.#beta, hRows, eRows, k, L, n, this.#forgetting, this.#limits, this.#betaBound, this.#moved, this.#wasm);
    if (refusal === "beta-overflow" && !this.#betaBoundExact) {
      this.#measureBeta();
      refusal = woodburyChunk(this.#p, this.#beta, hRows, eRows, k, L, n, this.#forgetting, this.#limits, this.#betaBound, this.#moved, this.#wasm);
    }
    if (refusal === "gain-unsafe" || refusal === "hPh-not-positive") {
      // row by row, so that every row gets the single-row guards and the recovery
      for (let r = 0; r < k; r++) {
        this.#z.set(zRows.subarray(r * n, (r + 1) * n));
        this.#forwardResidual();
        this.#update();
      }
      return k;
    }
    if (refusal !== null) this.#refuseOn(refusal);
    this.#accepted(k, this.#moved[0] as number);
    return k;
  }

  /**
   * The signed residual z − ẑ (scaled units: input minus reconstruction) of
   * the input scored last, written into `out` (length n); the per-feature
   * parts of {@link OselmAutoencoder.score}, for attributing a score's rise
   * to features. Needs a `score(x)` call directly before it (StateError otherwise).
   */
  residual(out: Float64Array): Float64Array {
    if (!(out instanceof Float64Array) || out.length !== this.#n) throw new DimensionError(COMPONENT, "out", this.#n, out instanceof Float64Array ? out.length : 0);
    if (!this.#scored) throw new StateError(COMPONENT, "residual needs a score(x) call directly before it");
    out.set(this.#e);
    return out;
  }

  /**
   * The reconstruction of x in input units: x̂ = scale ⊙ βᵀh + offset. Writes
   * into `out` (length n) without allocating when it is given.
   */
  reconstruct(x: ArrayLike<number>, out?: Float64Array): Float64Array {
    if (out !== undefined && (!(out instanceof Float64Array) || out.length !== this.#n)) {
      throw new DimensionError(COMPONENT, "out", this.#n, out instanceof Float64Array ? out.length : 0);
    }
    this.score(x);
    this.#scored = false;
    const result = out ?? new Float64Array(this.#n);
    const { offset, scale } = this.#scaling;
    for (let j = 0; j < this.#n; j++) {
      const r = (this.#z[j] as number) - (this.#e[j] as number);
      result[j] = offset === null || scale === null ? r : r * (scale[j] as number) + (offset[j] as number);
    }
    return result;
  }

  /** The numerical health of the state (O(L² + L·n)); see {@link AutoencoderHealth}. */
  health(): AutoencoderHealth {
    const L = this.#L;
    const p = this.#p;
    let minDiagonal = Infinity;
    let maxAsymmetry = 0;
    for (let i = 0; i < L; i++) {
      minDiagonal = Math.min(minDiagonal, p[i * L + i] as number);
      for (let j = i + 1; j < L; j++) maxAsymmetry = Math.max(maxAsymmetry, Math.abs((p[i * L + j] as number) - (p[j * L + i] as number)));
    }
    const finite = allFinite(p) && allFinite(this.#beta);
    const trace = this.#trace();
    const withinBound = this.#forgetting === 1 || trace <= this.#traceBound * (1 + 1e-9);
    return {
      count: this.#count,
      skipped: this.#skipped,
      refused: this.#refused,
      lastRefusal: this.#lastRefusal,
      windupLimited: this.#windupLimited,
      resets: this.#resets,
      lastReset: this.#lastReset,
      positiveDefinite: this.#positiveDefinite,
      trace,
      traceBound: this.#traceBound,
      minDiagonal,
      maxAsymmetry,
      finite,
      ok: finite && maxAsymmetry === 0 && minDiagonal > 0 && this.#positiveDefinite && withinBound,
    };
  }

  /** Bytes of learnable state held in memory: (L·n + L²) elements of the dtype, plus 2n float64 for a learnt or given scaling. */
  stateBytes(): number {
    return OselmAutoencoder.estimateBytes({ inputs: this.#n, hidden: this.#L, dtype: this.#dtype, scaled: this.#scaling.mode !== "none" });
  }

  /**
   * Bytes of learnable state of `members` autoencoders (default 1):
   * members · ((L·n + L²) · bytes(dtype) + (scaled ? 2n·8 : 0)). The hidden
   * layer (L·n + L) is not counted: it is drawn again from the seed.
   * @example
   * OselmAutoencoder.estimateBytes({ inputs: 256, hidden: 32, members: 4, dtype: "float32" }); // 147456
   */
  static estimateBytes(options: { inputs: number; hidden: number; members?: number; dtype?: Dtype; scaled?: boolean }): number {
    const o = optionsObject<typeof options>("OselmAutoencoder.estimateBytes", options, ["inputs", "hidden", "members", "dtype", "scaled"]);
    const n = positiveInteger("OselmAutoencoder.estimateBytes", "inputs", o.inputs, MAX_INPUTS);
    const L = integerInRange("OselmAutoencoder.estimateBytes", "hidden", o.hidden, 1, MAX_HIDDEN);
    const members = o.members === undefined ? 1 : positiveInteger("OselmAutoencoder.estimateBytes", "members", o.members);
    const dtype = o.dtype === undefined ? "float64" : oneOf("OselmAutoencoder.estimateBytes", "dtype", o.dtype, DTYPES);
    const scaled = o.scaled === true;
    return members * ((L * n + L * L) * bytesPerElement(dtype) + (scaled ? 2 * n * 8 : 0));
  }

  /** Copies of the hidden weights W (L × n, row-major), biases b and their checksum. */
  hiddenLayer(): { weights: Float64Array; biases: Float64Array; checksum: number } {
    return { weights: Float64Array.from(this.#layer.weights), biases: Float64Array.from(this.#layer.biases), checksum: this.#layer.checksum };
  }

  /** A copy of the output weights β (L × n, row-major). */
  outputWeights(): Float64Array {
    return Float64Array.from(this.#beta);
  }

  /** A copy of P, the inverse of the (weighted, regularized) Gram matrix (L × L, row-major). */
  inverseGram(): Float64Array {
    return Float64Array.from(this.#p);
  }

  /** The scaling in use: its mode and copies of offset and scale (null when none). */
  scaling(): { mode: Scaling["mode"]; offset: Float64Array | null; scale: Float64Array | null } {
    const { mode, offset, scale } = this.#scaling;
    return { mode, offset: offset === null ? null : offset.slice(), scale: scale === null ? null : scale.slice() };
  }

  /** An independent copy (it shares only the immutable hidden layer). */
  clone(): OselmAutoencoder {
    const copy = new OselmAutoencoder(this.#options());
    copy.#assign(this.#beta.slice(), this.#p.slice(), this.#scaling, this.#fitted);
    copy.#count = this.#count;
    copy.#skipped = this.#skipped;
    copy.#refused = this.#refused;
    copy.#windupLimited = this.#windupLimited;
    copy.#lastRefusal = this.#lastRefusal;
    copy.#counters(this.#resets, this.#lastReset, this.#refusalRun, this.#sinceCheck);
    copy.#positiveDefinite = this.#positiveDefinite;
    return copy;
  }

  /** The whole state as plain data: β, the upper triangle of P, counters, options and the hidden-layer checksum (not the hidden layer). */
  snapshot(): Snapshot<OselmAutoencoderState> {
    const L = this.#L;
    const upper: number[] = [];
    for (let i = 0; i < L; i++) for (let j = i; j < L; j++) upper.push(this.#p[i * L + j] as number);
    const { mode, offset, scale } = this.#scaling;
    return envelope(OselmAutoencoder.kind, OselmAutoencoder.version, {
      ...this.#plainOptions(),
      hiddenChecksum: this.#layer.checksum,
      scaling: mode,
      offset: offset === null ? null : toPlainArray(offset),
      scale: scale === null ? null : toPlainArray(scale),
      fitted: this.#fitted,
      count: this.#count,
      skipped: this.#skipped,
      refused: this.#refused,
      windupLimited: this.#windupLimited,
      lastRefusal: this.#lastRefusal,
      resets: this.#resets,
      lastReset: this.#lastReset,
      refusalRun: this.#refusalRun,
      sinceCheck: this.#sinceCheck,
      beta: toPlainArray(this.#beta),
      p: upper,
    });
  }

  /**
   * Rebuilds a model from {@link snapshot}: every size is checked before
   * anything is allocated, the hidden layer is drawn again from the seed and
   * must match the stored checksum; the copy continues bit for bit.
   */
  static restore(snapshot: unknown): OselmAutoencoder {
    const kind = OselmAutoencoder.kind;
    const s = openSnapshot(snapshot, kind, OselmAutoencoder.version);
    const n = s.integer("inputs", 1, MAX_INPUTS);
    const L = s.integer("hidden", 1, MAX_HIDDEN);
    checkedSize(kind, "state.beta", [L, n]);
    const activation = s.oneOf("activation", ACTIVATIONS);
    const ridge = s.number("ridge");
    if (!(ridge > 0)) s.fail("ridge", `must be > 0, got ${ridge}`);
    const forgetting = s.number("forgetting");
    if (!(forgetting > 0 && forgetting <= 1)) s.fail("forgetting", `must be in (0, 1], got ${forgetting}`);
    const traceBound = s.number("traceBound");
    if (!(traceBound > 0)) s.fail("traceBound", `must be > 0, got ${traceBound}`);
    const dtype = s.oneOf("dtype", DTYPES);
    const nonFinite = s.oneOf("nonFinite", ["refuse", "skip"] as const);
    const kernel = s.oneOf("kernel", KERNELS);
    const seed = s.string("seed");
    if (seed.length === 0) s.fail("seed", "must be a non-empty string");
    const checksum = s.integer("hiddenChecksum", 0, 2 ** 32 - 1);
    const mode = s.oneOf("scaling", ["none", "standardize", "given"] as const);
    const fitted = s.boolean("fitted");
    if (mode !== "standardize" && !fitted) s.fail("fitted", `must be true for scaling ${JSON.stringify(mode)}`);
    const hasScaling = mode === "given" || (mode === "standardize" && fitted);
    let offset: Float64Array | null = null;
    let scale: Float64Array | null = null;
    if (hasScaling) {
      offset = s.numbers("offset", n);
      scale = s.numbers("scale", n);
      for (let j = 0; j < n; j++) if (!((scale[j] as number) > 0)) s.fail(`scale[${j}]`, "must be > 0");
    } else {
      if (s.raw("offset") !== null) s.fail("offset", `must be null for scaling ${JSON.stringify(mode)}${mode === "standardize" ? " before fit" : ""}`);
      if (s.raw("scale") !== null) s.fail("scale", `must be null for scaling ${JSON.stringify(mode)}${mode === "standardize" ? " before fit" : ""}`);
    }
    const count = s.integer("count", 0, Number.MAX_SAFE_INTEGER);
    const skipped = s.integer("skipped", 0, Number.MAX_SAFE_INTEGER);
    const refused = s.integer("refused", 0, Number.MAX_SAFE_INTEGER);
    const windupLimited = s.integer("windupLimited", 0, Number.MAX_SAFE_INTEGER);
    const lastRefusal = s.stringOrNull("lastRefusal");
    if (lastRefusal !== null && !(REFUSALS as readonly string[]).includes(lastRefusal)) s.fail("lastRefusal", `must be null or one of ${REFUSALS.join(", ")}`);
    const resets = s.integer("resets", 0, Number.MAX_SAFE_INTEGER);
    const lastReset = s.stringOrNull("lastReset");
    if (lastReset !== null && !(RESETS as readonly string[]).includes(lastReset)) s.fail("lastReset", `must be null or one of ${RESETS.join(", ")}`);
    const refusalRun = s.integer("refusalRun", 0, REANCHOR_AFTER - 1);
    const sinceCheck = s.integer("sinceCheck", 0, CHECK_INTERVAL - 1);
    const betaValues = s.numbers("beta", L * n);
    const upper = s.numbers("p", (L * (L + 1)) / 2);
    const beta = allocate(dtype, L * n);
    const p = allocate(dtype, L * L);
    storeExactly(s.fail.bind(s), "beta", betaValues, beta);
    let t = 0;
    for (let i = 0; i < L; i++) {
      for (let j = i; j < L; j++) {
        const v = upper[t] as number;
        if (i === j && !(v > 0)) s.fail(`p[${t}]`, `is a diagonal entry of P and must be > 0, got ${v}`);
        if (dtype === "float32" && Math.fround(v) !== v) s.fail(`p[${t}]`, `is not a float32 value: ${v}`);
        p[i * L + j] = v;
        p[j * L + i] = v;
        t++;
      }
    }
    const range = stateRangeProblem(beta, p, L, LIMITS[dtype]);
    if (range !== null) s.fail(range.startsWith("β") ? "beta" : "p", `is out of the range the model keeps: ${range}`);
    if (!isPositiveDefinite(p, L)) s.fail("p", "is not positive definite (its Cholesky factorisation meets a pivot ≤ 0)");
    const layer = drawHiddenLayer(seed, n, L, dtype, activation !== "identity");
    if (layer.checksum !== checksum) {
      throw new SnapshotError(kind, "state.hiddenChecksum", `is ${checksum}, but the hidden layer drawn from seed ${JSON.stringify(seed)} has checksum ${layer.checksum}`);
    }
    const options: InternalOptions = { inputs: n, hidden: L, seed, activation, ridge, forgetting, traceBound, dtype, nonFinite, kernel, [LAYER]: layer };
    let model: OselmAutoencoder;
    try {
      model = new OselmAutoencoder(options);
    } catch (error) {
      throw new SnapshotError(kind, "state", `holds options the model refuses: ${(error as Error).message}`);
    }
    model.#assign(beta, p, { mode, offset, scale }, fitted);
    model.#count = count;
    model.#skipped = skipped;
    model.#refused = refused;
    model.#windupLimited = windupLimited;
    model.#lastRefusal = lastRefusal;
    model.#counters(resets, lastReset as Reset | null, refusalRun, sinceCheck);
    model.#measureBeta();
    return model;
  }

  /** The resolved options as plain data (every default filled in). */
  #plainOptions(): Required<Omit<OselmAutoencoderOptions, "scaling">> & { seed: string } {
    return {
      inputs: this.#n,
      hidden: this.#L,
      activation: this.#activation,
      ridge: this.#ridge,
      forgetting: this.#forgetting,
      traceBound: this.#traceBound,
      dtype: this.#dtype,
      nonFinite: this.#nonFinite,
      kernel: this.#wasm === null ? "typescript" : "wasm-simd",
      seed: this.#seed,
    };
  }

  /** Options that build a copy sharing this model's hidden layer. */
  #options(): InternalOptions {
    return { ...this.#plainOptions(), [LAYER]: this.#layer };
  }

  #assign(beta: Vector, p: Vector, scaling: Scaling, fitted: boolean): void {
    this.#beta.set(beta);
    this.#p = p;
    this.#scaling = {
      mode: scaling.mode,
      offset: scaling.offset === null ? null : scaling.offset.slice(),
      scale: scaling.scale === null ? null : scaling.scale.slice(),
    };
    this.#fitted = fitted;
  }

  /** P = I/δ, β = 0: the start with no batch. */
  #resetPrior(): void {
    const L = this.#L;
    this.#p.fill(0);
    for (let i = 0; i < L; i++) this.#p[i * L + i] = 1 / this.#ridge;
    this.#beta.fill(0);
  }

  #trace(): number {
    let trace = 0;
    for (let i = 0; i < this.#L; i++) trace += this.#p[i * this.#L + i] as number;
    return trace;
  }

  #counters(resets: number, lastReset: Reset | null, refusalRun: number, sinceCheck: number): void {
    this.#resets = resets;
    this.#lastReset = lastReset;
    this.#refusalRun = refusalRun;
    this.#sinceCheck = sinceCheck;
  }

  /** h = g(W·z + b) and e = z − βᵀh from the buffer z; returns Σe²/n. */
  #forwardResidual(): number {
    const wasm = this.#wasm;
    if (wasm === null) {
      hiddenForward(this.#layer, this.#activation, this.#z, this.#h);
      return outputResidual(this.#beta, this.#h, this.#z, this.#L, this.#n, this.#e);
    }
    if (wasm.float32) {
      wasm.z.set(this.#z); // rounded to float32, as the kernels compute
      wasm.forward();
      this.#h.set(wasm.h);
    } else wasm.forward();
    activateInPlace(this.#h, this.#L, this.#activation);
    return this.#residual();
  }

  /** e = z − βᵀh from the buffers z and h (already activated); returns Σe²/n. */
  #residual(): number {
    const wasm = this.#wasm;
    if (wasm === null) return outputResidual(this.#beta, this.#h, this.#z, this.#L, this.#n, this.#e);
    if (!wasm.float32) return wasm.residual();
    // float32 kernels: z and h as float32 go in, and the model keeps the values the kernels used
    wasm.z.set(this.#z);
    wasm.h.set(this.#h);
    this.#z.set(wasm.z);
    this.#h.set(wasm.h);
    const loss = wasm.residual();
    this.#e.set(wasm.e);
    return loss;
  }

  /** max |β_ij| exactly (O(L·n)). */
  #measureBeta(): void {
    let max = 0;
    for (let i = 0; i < this.#beta.length; i++) {
      const v = Math.abs(this.#beta[i] as number);
      if (v > max) max = v;
    }
    this.#betaBound = max;
    this.#betaBoundExact = true;
  }

  /** One guarded Sherman–Morrison step from the buffers h and e; re-measures β once before refusing it as overflowing. */
  #step(): Refusal {
    const step = (): Refusal =>
      shermanMorrisonStep(this.#p, this.#beta, this.#h, this.#e, this.#L, this.#n, this.#forgetting, this.#traceBound, this.#limits, this.#betaBound, this.#ws, this.#wasm);
    const refusal = step();
    if (refusal !== "beta-overflow" || this.#betaBoundExact) return refusal;
    this.#measureBeta();
    return step();
  }

  /**
   * The Sherman–Morrison step with its recovery, re-anchoring: P ← I/δₐ with β
   * kept (covariance resetting; Goodwin & Sin, Adaptive Filtering Prediction
   * and Control, 1984 — from memory). It happens when P has lost positive
   * definiteness (hᵀPh ≤ 0 for h ≠ 0, or a failed Cholesky check), with δₐ = δ;
   * when the gain is unsafe but P's confidence along h, spread evenly
   * (δₐ = max(δ, ‖h‖²/hᵀPh)), would take the row safely (P has gathered more
   * information in some directions than the dtype resolves next to the
   * others); and when this update would be refused after {@link REANCHOR_AFTER} refused
   * ones in a row (a lasting change of scale), with δₐ = max(δ, ‖h‖²) so that
   * the prior weighs no more than one row of the new size. The update is then
   * tried once more on the re-anchored P; if that is refused too, P is put
   * back (unless it was not positive definite). Any other refusal keeps the state as it was.
   */
  #update(): void {
    let refusal = this.#step();
    if (refusal === null) {
      this.#accepted(1, this.#ws.increment);
      return;
    }
    const broken = refusal === "hPh-not-positive";
    // an unsafe gain from a row that P's current confidence along h would take safely: P has lost resolution elsewhere
    const unresolved = refusal === "gain-unsafe" && this.#ws.c > 0 && Number.isFinite(this.#ws.hh / this.#ws.c);
    const lasting = !broken && refusal !== "hidden-layer-zero" && this.#refusalRun + 1 >= REANCHOR_AFTER;
    const attempts: [number, Reset][] = [];
    if (broken) attempts.push([this.#ridge, "not-positive-definite"]);
    if (unresolved) attempts.push([Math.max(this.#ridge, this.#ws.hh / this.#ws.c), "lost-resolution"]);
    if (lasting) attempts.push([Math.max(this.#ridge, this.#ws.hh), "persistent-refusals"]);
    const kept = broken ? null : this.#p.slice();
    const before = { lastReset: this.#lastReset, sinceCheck: this.#sinceCheck, positiveDefinite: this.#positiveDefinite };
    for (const [ridge, why] of attempts) {
      this.#reanchor(ridge, why);
      refusal = this.#step();
      if (refusal === null) {
        this.#accepted(1, this.#ws.increment);
        return;
      }
      this.#resets--;
    }
    if (kept !== null && attempts.length > 0) {
      this.#p.set(kept);
      this.#lastReset = before.lastReset;
      this.#sinceCheck = before.sinceCheck;
      this.#positiveDefinite = before.positiveDefinite;
    } else if (broken) this.#resets++; // P stays re-anchored: it was not positive definite
    this.#refuseOn(refusal);
  }

  /** P ← I/ridge, β kept. */
  #reanchor(ridge: number, why: Reset): void {
    const L = this.#L;
    this.#p.fill(0);
    for (let i = 0; i < L; i++) this.#p[i * L + i] = 1 / ridge;
    this.#resets++;
    this.#lastReset = why;
    this.#positiveDefinite = true;
    this.#sinceCheck = 0;
  }

  /** Bookkeeping after `rows` accepted rows that moved β by at most `moved`; the periodic Cholesky check. */
  #accepted(rows: number, moved: number): void {
    if (this.#ws.appliedForgetting > this.#forgetting && rows === 1) this.#windupLimited++;
    this.#count += rows;
    this.#refusalRun = 0;
    this.#betaBound += moved;
    this.#betaBoundExact = false;
    this.#sinceCheck += rows;
    if (this.#sinceCheck < CHECK_INTERVAL) return;
    this.#sinceCheck = 0;
    this.#positiveDefinite = isPositiveDefinite(this.#p, this.#L);
    if (!this.#positiveDefinite) this.#reanchor(this.#ridge, "not-positive-definite");
  }

  #refuseOn(refusal: Exclude<Refusal, null>): never {
    this.#refused++;
    this.#lastRefusal = refusal;
    if (refusal !== "hidden-layer-zero") this.#refusalRun = Math.min(this.#refusalRun + 1, REANCHOR_AFTER - 1);
    const why = {
      "hidden-layer-zero":
        "the hidden layer is all zero for this input (the identity activation has no bias, so an all-zero input gives h = 0 and nothing to learn)",
      "hPh-not-positive": "hᵀPh is not positive, and P re-anchored to the ridge prior still refuses it",
      "gain-unsafe": `the update would leave P less curvature along h than ${this.#dtype} resolves (the row is too large for the state: scale the inputs or raise ridge)`,
      "gain-not-finite": "the hidden layer, the gain or the residual is non-finite or absurdly large",
      "beta-overflow": `an entry of β would leave the ${this.#dtype} range (|β| ≤ ${this.#limits.betaLimit})`,
      "p-overflow": `an entry of P would leave the ${this.#dtype} range`,
    }[refusal];
    throw new StateError(COMPONENT, `update refused: ${why}; the state is unchanged`);
  }

  #requireReady(operation: string): void {
    if (!this.#fitted) throw new StateError(COMPONENT, `${operation} needs fit(rows) first: "standardize" scaling is learnt from the rows given to fit`);
  }
}

const NO_SCALING: Scaling = { mode: "none", offset: null, scale: null };

/** The refusal of an input whose reconstruction error (or its square) leaves the float64 range. */
function overflowError(x: ArrayLike<number>, parameter = "x"): SampleError {
  let largest = 0;
  for (let j = 0; j < x.length; j++) if (Math.abs(x[j] as number) > Math.abs(largest)) largest = x[j] as number;
  return new SampleError(COMPONENT, parameter, largest, "an input whose squared reconstruction error stays finite (this one overflows; the state is unchanged)");
}

/**
 * Where β or P leaves the range the update guards keep them in, or null:
 * |β_ij| ≤ betaLimit, and P's diagonal (which bounds every entry of a
 * positive definite P) summing to at most stateLimit.
 */
function stateRangeProblem(beta: Vector, p: Vector, L: number, limits: NumericLimits): string | null {
  for (let i = 0; i < beta.length; i++) {
    if (!(Math.abs(beta[i] as number) <= limits.betaLimit)) return `β has an entry ${beta[i]} beyond ±${limits.betaLimit}`;
  }
  let trace = 0;
  for (let i = 0; i < L; i++) trace += p[i * L + i] as number;
  if (!(trace <= limits.stateLimit)) return `P has trace ${trace}, above ${limits.stateLimit}`;
  return null;
}

function allFinite(values: Vector): boolean {
  let check = 0;
  for (let i = 0; i < values.length; i++) check += (values[i] as number) * 0;
  return check === 0;
}

function storeExactly(fail: (name: string, problem: string) => never, name: string, values: Float64Array, into: Vector): void {
  for (let i = 0; i < values.length; i++) {
    const v = values[i] as number;
    into[i] = v;
    if (into[i] !== v) fail(`${name}[${i}]`, `is not a value of the snapshot's dtype: ${v}`);
  }
}

