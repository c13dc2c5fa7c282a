import {
  DimensionError,
  NonFiniteError,
  OptionError,
  SnapshotError,
  SampleError,
  StateError,
  checkedSize,
  envelope,
  integerInRange,
  MAX_SNAPSHOT_ELEMENTS,
  nonFiniteOption,
  oneOf,
  openSnapshot,
  optionsObject,
  requireNumbers,
  positiveInteger,
  positiveNumber,
  seedOption,
  toPlainArray,
  type NonFinitePolicy,
  type Snapshot,
} from "@leeway/core";
import { ACTIVATIONS, type Activation } from "./activation.js";
import { FrozenModel } from "./frozen-model.js";
import { learningOptions, MAX_HIDDEN, MAX_INPUTS, OselmAutoencoder, SCORE_SHARED, type OselmAutoencoderOptions, type OselmAutoencoderState } from "./oselm-autoencoder.js";
import { scalingOption, type ScalingOption } from "./scaling.js";
import { DTYPES, type Dtype } from "./vector.js";
import { KERNELS, type Kernel } from "./wasm-kernels.js";

const COMPONENT = "AutoencoderPool";
/** Largest accepted maxMembers. */
export const MAX_MEMBERS = 64;
/** Largest accepted spawnPatience. */
export const MAX_SPAWN_PATIENCE = 10_000;

/**
 * Options of {@link AutoencoderPool}. The member options (activation, ridge,
 * forgetting, traceBound, dtype, scaling) are those of {@link OselmAutoencoderOptions};
 * "standardize" scaling fits each member's scaling to the rows it starts from.
 * `nonFinite` applies to `learn`; `score` always refuses non-finite values.
 */
export interface AutoencoderPoolOptions
  extends Pick<OselmAutoencoderOptions, "activation" | "ridge" | "forgetting" | "traceBound" | "dtype" | "scaling" | "nonFinite" | "kernel"> {
  /** n, the input length of every member. */
  inputs: number;
  /** L, the hidden units of every member. */
  hidden: number;
  /** Most members the pool holds (1 to 64). */
  maxMembers: number;
  /** A new member is started when the lowest loss stays above this (in score units); default Infinity: only an empty pool starts a member. */
  spawnLoss?: number;
  /** Consecutive samples above spawnLoss that start a new member, and the rows it is fitted on; default `hidden`. */
  spawnPatience?: number;
  /** Seed of the pool; member k's hidden layer is drawn from `${seed}/member/${k}` (from `${seed}/shared` for every member with sharedHiddenLayer). */
  seed: number | string;
  /**
   * One hidden layer for every member (default false): each sample's hidden
   * activations are computed once instead of once per member, about 1.5× the
   * samples per second for 4 members of 256-32. Needs a scaling common to all
   * members ("none" or given), not "standardize".
   */
  sharedHiddenLayer?: boolean;
}

/** What {@link AutoencoderPool.score} returns. */
export interface PoolScore {
  /** Index of the nearest member (lowest loss), or −1 for an empty pool. */
  member: number;
  /** Its loss (Infinity for an empty pool). */
  loss: number;
  /** Every member's loss: a buffer reused by the next call (copy it to keep it). */
  losses: Float64Array;
}

/** What {@link AutoencoderPool.learn} returns. */
export interface PoolLearnReading {
  /** The member that learnt the sample (a new one when `spawned`), or −1 when the sample waits in the spawn run or was skipped. */
  member: number;
  /** The nearest member's loss before learning (Infinity for an empty pool, NaN for a skipped sample). */
  loss: number;
  /** True when this sample completed a run and started a new member. */
  spawned: boolean;
  /** Samples waiting in the current run above spawnLoss. */
  pending: number;
  /** Samples skipped as non-finite so far. */
  skipped: number;
}

/** Read-only facts about one member. */
export interface MemberInfo {
  index: number;
  /** The member's label (an operating mode's name), or null. */
  label: string | null;
  /** Rows the member has learnt (including the rows it was fitted on). */
  learnt: number;
  /** Times it was the nearest member in score or learn calls. */
  nearest: number;
  /** The pool's call counter (score and learn calls) when it was last nearest or learnt, or −1. */
  lastUsed: number;
}

interface Member {
  model: OselmAutoencoder;
  label: string | null;
  nearest: number;
  lastUsed: number;
}

/** The plain state in a snapshot of {@link AutoencoderPool}. */
export interface AutoencoderPoolState {
  inputs: number;
  hidden: number;
  maxMembers: number;
  spawnLoss: number | null;
  spawnPatience: number;
  seed: string;
  sharedHiddenLayer: boolean;
  activation: Activation;
  ridge: number;
  forgetting: number;
  traceBound: number | null;
  dtype: Dtype;
  scaling: "none" | "standardize" | "given";
  scalingOffset: number[] | null;
  scalingScale: number[] | null;
  nonFinite: NonFinitePolicy;
  /** The members' kernel, or null for the model's default. */
  kernel: Kernel | null;
  spawned: number;
  calls: number;
  skipped: number;
  members: { label: string | null; nearest: number; lastUsed: number; model: Snapshot<OselmAutoencoderState> }[];
  pending: number[][];
}

/**
 * A pool of OS-ELM autoencoders, one per operating mode. Each sample is scored
 * by every member; the nearest (lowest loss) learns it. When the lowest loss
 * stays above `spawnLoss` for `spawnPatience` samples and there is room, those
 * samples start a new member (fitted on them by ridge least squares). When the
 * pool is full, the nearest member learns every sample; a new mode then takes
 * a member's place through {@link AutoencoderPool.replaceMember} (for example
 * the {@link AutoencoderPool.leastRecentlyUsed} one).
 * @example
 * const pool = new AutoencoderPool({ inputs: 2, hidden: 3, maxMembers: 2, spawnPatience: 1, seed: 1 });
 * pool.learn(Float64Array.of(1, 0)).spawned; // true: the empty pool starts member 0
 * pool.score(Float64Array.of(1, 0)).member; // 0
 */
export class AutoencoderPool {
  static readonly kind = "leeway.pool.autoencoder-pool";
  static readonly version = 3;

  readonly #n: number;
  readonly #L: number;
  readonly #maxMembers: number;
  readonly #spawnLoss: number;
  readonly #spawnPatience: number;
  readonly #shared: boolean;
  readonly #seed: string;
  readonly #memberOptions: OselmAutoencoderOptions;
  readonly #scaling: AutoencoderPoolState["scaling"];
  readonly #nonFinite: NonFinitePolicy;
  readonly #members: Member[] = [];
  #pending: Float64Array[] = [];
  #spawned = 0;
  #calls = 0;
  #skipped = 0;
  #losses = new Float64Array(0);
  /** True from a score() of a non-empty pool until the next call that learns or changes members. */
  #scored = false;

  constructor(options: AutoencoderPoolOptions) {
    const o = optionsObject<AutoencoderPoolOptions>(COMPONENT, options, [
      "inputs", "hidden", "maxMembers", "spawnLoss", "spawnPatience", "seed", "activation", "ridge", "forgetting", "traceBound", "dtype", "scaling", "nonFinite", "sharedHiddenLayer", "kernel",
    ]);
    if (o.inputs === undefined) throw new OptionError(COMPONENT, "inputs", undefined, `an integer in [1, ${MAX_INPUTS}]`);
    this.#n = positiveInteger(COMPONENT, "inputs", o.inputs, MAX_INPUTS);
    this.#L = integerInRange(COMPONENT, "hidden", o.hidden, 1, MAX_HIDDEN);
    this.#maxMembers = integerInRange(COMPONENT, "maxMembers", o.maxMembers, 1, MAX_MEMBERS);
    this.#spawnLoss = o.spawnLoss === undefined || o.spawnLoss === Infinity ? Infinity : positiveNumber(COMPONENT, "spawnLoss", o.spawnLoss);
    this.#spawnPatience = o.spawnPatience === undefined ? this.#L : integerInRange(COMPONENT, "spawnPatience", o.spawnPatience, 1, MAX_SPAWN_PATIENCE);
    this.#seed = String(seedOption(COMPONENT, "seed", o.seed));
    if (o.sharedHiddenLayer !== undefined && typeof o.sharedHiddenLayer !== "boolean") throw new OptionError(COMPONENT, "sharedHiddenLayer", o.sharedHiddenLayer, "true or false");
    this.#shared = o.sharedHiddenLayer === true;
    this.#nonFinite = nonFiniteOption(COMPONENT, o.nonFinite);
    if (this.#n * this.#L > MAX_SNAPSHOT_ELEMENTS) {
      throw new OptionError(COMPONENT, "hidden", o.hidden, `at most ${Math.floor(MAX_SNAPSHOT_ELEMENTS / this.#n)} for ${this.#n} inputs`);
    }
    const scaling = scalingOption(COMPONENT, o.scaling, this.#n);
    this.#scaling = scaling.mode;
    if (this.#shared && this.#scaling === "standardize") {
      throw new OptionError(COMPONENT, "scaling", o.scaling, '"none" or given { offset, scale } with sharedHiddenLayer (a scaling fitted per member would feed each member a different input)');
    }
    if (this.#scaling === "standardize" && this.#spawnPatience < 2) {
      throw new OptionError(COMPONENT, "spawnPatience", o.spawnPatience, 'an integer >= 2 with "standardize" scaling (the scaling is fitted to the starting rows)');
    }
    const memberOptions: OselmAutoencoderOptions = {
      inputs: this.#n,
      hidden: this.#L,
      seed: this.#shared ? `${this.#seed}/shared` : `${this.#seed}/member/0`,
      scaling: scaling.offset !== null && scaling.scale !== null ? { offset: scaling.offset, scale: scaling.scale } : scaling.mode === "standardize" ? "standardize" : "none",
    };
    // validated once, by the model's own option check; only given options are kept, so defaults stay the model's
    learningOptions(COMPONENT, o, this.#L);
    if (o.activation !== undefined) memberOptions.activation = o.activation;
    if (o.ridge !== undefined) memberOptions.ridge = o.ridge;
    if (o.forgetting !== undefined) memberOptions.forgetting = o.forgetting;
    if (o.traceBound !== undefined) memberOptions.traceBound = o.traceBound;
    if (o.dtype !== undefined) memberOptions.dtype = o.dtype;
    if (o.kernel !== undefined) {
      memberOptions.kernel = oneOf(COMPONENT, "kernel", o.kernel, KERNELS);
    }
    this.#memberOptions = memberOptions;
  }

  /** n, the input length. */
  get inputs(): number {
    return this.#n;
  }
  /** L, the hidden units of every member. */
  get hidden(): number {
    return this.#L;
  }
  /** Members in the pool now. */
  get size(): number {
    return this.#members.length;
  }
  /** Most members the pool may hold. */
  get maxMembers(): number {
    return this.#maxMembers;
  }
  /** Samples waiting in the current run above spawnLoss. */
  get pending(): number {
    return this.#pending.length;
  }
  /** Non-finite samples skipped by learn. */
  get skipped(): number {
    return this.#skipped;
  }
  /**
   * True directly after {@link score} on a non-empty pool, while nothing has
   * learnt or changed members since: {@link learnScored} can then learn that
   * sample without a second forward pass.
   */
  get scored(): boolean {
    return this.#scored;
  }
  /** Facts about every member (fresh objects; changing them changes nothing). */
  get members(): readonly MemberInfo[] {
    return this.#members.map((m, index) => ({ index, label: m.label, learnt: m.model.count, nearest: m.nearest, lastUsed: m.lastUsed }));
  }

  /**
   * Scores x by every member into a reused buffer and names the nearest
   * (lowest loss; the first on ties). Refuses a wrong length and non-finite values.
   */
  score(x: ArrayLike<number>): PoolScore {
    this.#scored = false;
    this.#check(x, true);
    this.#calls++;
    if (this.#members.length === 0) return { member: -1, loss: Infinity, losses: this.#losses };
    let nearest: number;
    try {
      nearest = this.#scoreAll(x);
    } catch (error) {
      this.#uncount(error);
    }
    this.#scored = true;
    return { member: nearest, loss: this.#losses[nearest] as number, losses: this.#losses };
  }

  /**
   * Learns the sample just passed to {@link score} by member `member` (default:
   * the nearest), reusing the hidden activations and residual that score
   * computed: no second forward pass. The state and the reading are those of
   * `learn(x, member)` with the same x, bit for bit. Valid only while
   * {@link scored} is true (E_STATE otherwise); an update the member refuses
   * as numerically unsafe throws E_STATE and keeps its state, as `learn` does.
   * @example
   * const pool = new AutoencoderPool({ inputs: 2, hidden: 3, maxMembers: 1, seed: 1 });
   * pool.addMember([Float64Array.of(1, 0), Float64Array.of(0.9, 0.1)]);
   * const { member, loss } = pool.score(Float64Array.of(1, 0.05));
   * pool.learnScored(member).loss === loss; // true
   */
  learnScored(member?: number): PoolLearnReading {
    if (!this.#scored) throw new StateError(COMPONENT, "learnScored needs a score(x) of a non-empty pool directly before it, with nothing learnt or changed in between");
    const index = member ?? this.#nearestScored();
    const m = this.#member(index);
    this.#scored = false;
    this.#calls++;
    const loss = this.#losses[index] as number;
    m.model.learnScored();
    m.lastUsed = this.#calls;
    return { member: index, loss, spawned: false, pending: this.#pending.length, skipped: this.#skipped };
  }

  /**
   * Learns x: by member `member` when it is given, otherwise by the nearest
   * member — or, when the lowest loss is above spawnLoss (always, for an empty
   * pool) and there is room, x joins the run that starts a new member after
   * spawnPatience samples. A sample below spawnLoss ends the run and its
   * samples are dropped.
   */
  learn(x: ArrayLike<number>, member?: number): PoolLearnReading {
    this.#scored = false;
    const finite = this.#check(x, this.#nonFinite === "refuse");
    const m = member === undefined ? null : this.#member(member);
    this.#calls++;
    if (!finite) {
      this.#skipped++;
      return { member: -1, loss: Number.NaN, spawned: false, pending: this.#pending.length, skipped: this.#skipped };
    }
    if (m !== null) {
      let loss: number;
      try {
        loss = m.model.learn(x);
      } catch (error) {
        this.#uncount(error);
      }
      m.lastUsed = this.#calls;
      return { member: member as number, loss, spawned: false, pending: this.#pending.length, skipped: this.#skipped };
    }
    const size = this.#members.length;
    let nearest = -1;
    try {
      if (size > 0) nearest = this.#scoreAll(x);
    } catch (error) {
      this.#uncount(error);
    }
    const loss = nearest < 0 ? Infinity : (this.#losses[nearest] as number);
    const above = size === 0 || loss > this.#spawnLoss;
    if (above && size < this.#maxMembers) {
      this.#pending.push(Float64Array.from(x));
      if (this.#pending.length < this.#spawnPatience) return { member: -1, loss, spawned: false, pending: this.#pending.length, skipped: this.#skipped };
      const rows = this.#pending;
      this.#pending = []; // a run whose fit is refused is dropped, so that later samples start a fresh one
      const index = this.#addFitted(rows, null);
      return { member: index, loss, spawned: true, pending: 0, skipped: this.#skipped };
    }
    this.#pending = [];
    (this.#members[nearest] as Member).model.learnScored();
    return { member: nearest, loss, spawned: false, pending: 0, skipped: this.#skipped };
  }

  /**
   * Starts a new member with an optional label and returns its index: fitted
   * on `rows` (ridge least squares), or a learning copy of a
   * {@link FrozenModel} with the pool's member options (see
   * {@link replaceMember}). E_STATE when the pool is full.
   */
  addMember(source: readonly ArrayLike<number>[] | FrozenModel, label: string | null = null): number {
    if (label !== null && typeof label !== "string") throw new OptionError(COMPONENT, "label", label, "a string or null");
    if (this.#members.length >= this.#maxMembers) throw new StateError(COMPONENT, `addMember: the pool is full (${this.#maxMembers} members)`);
    if (!(source instanceof FrozenModel)) return this.#addFitted(this.#sourceRows(source), label);
    const model = this.#thawed(source);
    this.#scored = false;
    this.#members.push({ model, label, nearest: 0, lastUsed: this.#calls });
    this.#losses = new Float64Array(this.#members.length);
    return this.#members.length - 1;
  }

  /**
   * Replaces member `member` in place and returns its index. Given rows, the
   * new member is a fresh autoencoder fitted on them by ridge least squares,
   * with a hidden layer drawn from the next member seed (as {@link addMember});
   * given a {@link FrozenModel} (for example an older reference of the same
   * pool), a learning copy of it takes the place. Either way the member's
   * usage counts start again (`nearest` 0, `lastUsed` now) and its label is
   * `label`; the other members, their indices and the pending run are not
   * touched. This is how a full pool takes in a new operating mode: replace
   * the member that has gone unused longest ({@link leastRecentlyUsed}),
   * after freezing it if it must stay recognisable. A frozen model must have
   * the pool's member options (sizes, activation, ridge, forgetting, trace
   * bound, dtype, scaling mode); E_OPTION otherwise.
   * @example
   * const pool = new AutoencoderPool({ inputs: 2, hidden: 3, maxMembers: 1, seed: 1 });
   * pool.addMember([Float64Array.of(1, 0), Float64Array.of(0.9, 0.1)], "low");
   * pool.replaceMember(0, [Float64Array.of(0, 1), Float64Array.of(0.1, 0.9)], "high");
   * [pool.size, pool.members[0]?.label]; // [1, "high"]
   */
  replaceMember(member: number, source: readonly ArrayLike<number>[] | FrozenModel, label: string | null = null): number {
    this.#member(member);
    if (label !== null && typeof label !== "string") throw new OptionError(COMPONENT, "label", label, "a string or null");
    let model: OselmAutoencoder;
    if (source instanceof FrozenModel) model = this.#thawed(source);
    else {
      model = new OselmAutoencoder({ ...this.#memberOptions, seed: this.#memberSeed() });
      model.fit(this.#sourceRows(source));
      this.#spawned++;
    }
    this.#scored = false;
    this.#members[member] = { model, label, nearest: 0, lastUsed: this.#calls };
    return member;
  }

  /**
   * The member that has gone longest without being the nearest or learning
   * (smallest `lastUsed`; on ties the one nearest least often, then the
   * lowest index), or −1 for an empty pool.
   */
  leastRecentlyUsed(): number {
    let best = -1;
    for (let i = 0; i < this.#members.length; i++) {
      const m = this.#members[i] as Member;
      const b = best < 0 ? null : (this.#members[best] as Member);
      if (b === null || m.lastUsed < b.lastUsed || (m.lastUsed === b.lastUsed && m.nearest < b.nearest)) best = i;
    }
    return best;
  }

  /** Sets (or clears, with null) a member's label. */
  setLabel(member: number, label: string | null): void {
    if (label !== null && typeof label !== "string") throw new OptionError(COMPONENT, "label", label, "a string or null");
    this.#member(member).label = label;
  }

  /** A frozen copy of a member: it scores but never learns. */
  freeze(member: number): FrozenModel {
    const m = this.#member(member);
    return FrozenModel.from(m.model, m.label);
  }

  /** An independent learning copy of a member's model. */
  memberModel(member: number): OselmAutoencoder {
    return this.#member(member).model.clone();
  }

  /** Bytes of learnable state of all members (the sum of their stateBytes). */
  stateBytes(): number {
    let bytes = 0;
    for (const m of this.#members) bytes += m.model.stateBytes();
    return bytes;
  }

  /** The whole pool as plain data: options, counters, the pending run and every member's compact snapshot. */
  snapshot(): Snapshot<AutoencoderPoolState> {
    const o = this.#memberOptions;
    const given = this.#scaling === "given" ? (o.scaling as { offset: Float64Array; scale: Float64Array }) : null;
    return envelope(AutoencoderPool.kind, AutoencoderPool.version, {
      inputs: this.#n,
      hidden: this.#L,
      maxMembers: this.#maxMembers,
      spawnLoss: this.#spawnLoss === Infinity ? null : this.#spawnLoss,
      spawnPatience: this.#spawnPatience,
      seed: this.#seed,
      sharedHiddenLayer: this.#shared,
      activation: o.activation ?? "sigmoid",
      ridge: o.ridge ?? 0.01,
      forgetting: o.forgetting ?? 1,
      traceBound: o.traceBound ?? null,
      dtype: o.dtype ?? "float64",
      scaling: this.#scaling,
      scalingOffset: given === null ? null : toPlainArray(given.offset),
      scalingScale: given === null ? null : toPlainArray(given.scale),
      nonFinite: this.#nonFinite,
      kernel: o.kernel ?? null,
      spawned: this.#spawned,
      calls: this.#calls,
      skipped: this.#skipped,
      members: this.#members.map((m) => ({ label: m.label, nearest: m.nearest, lastUsed: m.lastUsed, model: m.model.snapshot() })),
      pending: this.#pending.map((row) => toPlainArray(row)),
    });
  }

  /** Rebuilds a pool from {@link snapshot}; sizes are checked before anything is allocated, and every member must match the pool's sizes. */
  static restore(snapshot: unknown): AutoencoderPool {
    const kind = AutoencoderPool.kind;
    const s = openSnapshot(snapshot, kind, AutoencoderPool.version);
    const inputs = s.integer("inputs", 1, MAX_INPUTS);
    const hidden = s.integer("hidden", 1, MAX_HIDDEN);
    checkedSize(kind, "state.inputs", [inputs, hidden]);
    const maxMembers = s.integer("maxMembers", 1, MAX_MEMBERS);
    const spawnLoss = s.numberOrNull("spawnLoss");
    const spawnPatience = s.integer("spawnPatience", 1, MAX_SPAWN_PATIENCE);
    const seed = s.string("seed");
    const sharedHiddenLayer = s.boolean("sharedHiddenLayer");
    const activation = s.oneOf("activation", ACTIVATIONS);
    const ridge = s.number("ridge");
    const forgetting = s.number("forgetting");
    const traceBound = s.numberOrNull("traceBound");
    const dtype = s.oneOf("dtype", DTYPES);
    const scaling = s.oneOf("scaling", ["none", "standardize", "given"] as const);
    let scalingOption: ScalingOption = scaling === "given" ? "none" : scaling;
    if (scaling === "given") {
      scalingOption = { offset: s.numbers("scalingOffset", inputs), scale: s.numbers("scalingScale", inputs) };
    } else {
      if (s.raw("scalingOffset") !== null) s.fail("scalingOffset", `must be null for scaling ${JSON.stringify(scaling)}`);
      if (s.raw("scalingScale") !== null) s.fail("scalingScale", `must be null for scaling ${JSON.stringify(scaling)}`);
    }
    const nonFinite = s.oneOf("nonFinite", ["refuse", "skip"] as const);
    const kernelRaw = s.raw("kernel");
    const kernel = kernelRaw === null ? undefined : s.oneOf("kernel", KERNELS);
    const spawned = s.integer("spawned", 0, Number.MAX_SAFE_INTEGER);
    const calls = s.integer("calls", 0, Number.MAX_SAFE_INTEGER);
    const skipped = s.integer("skipped", 0, Number.MAX_SAFE_INTEGER);
    const memberReaders = s.objects("members", { max: maxMembers });
    // (members thawed from frozen models are not counted in spawned, so the list may be longer than spawned)
    // members are replaced but never removed: once one was started the list cannot be empty
    if (spawned > 0 && memberReaders.length === 0) s.fail("members", `is empty although spawned says ${spawned} member(s) were started`);
    const pendingRows = s.rawArray("pending", { max: spawnPatience - 1 });
    checkedSize(kind, "state.pending", [pendingRows.length, inputs]);
    const options: AutoencoderPoolOptions = { inputs, hidden, maxMembers, spawnPatience, seed, activation, ridge, forgetting, dtype, scaling: scalingOption, nonFinite, sharedHiddenLayer };
    if (kernel !== undefined) options.kernel = kernel;
    if (spawnLoss !== null) options.spawnLoss = spawnLoss;
    if (traceBound !== null) options.traceBound = traceBound;
    let pool: AutoencoderPool;
    try {
      pool = new AutoencoderPool(options);
    } catch (error) {
      throw new SnapshotError(kind, "state", `holds options the pool refuses: ${(error as Error).message}`);
    }
    const pending = pendingRows.map((row, i) => readRow(kind, `state.pending[${i}]`, row, inputs));
    const members: Member[] = memberReaders.map((m, i) => {
      const model = OselmAutoencoder.restore(m.raw("model"));
      const st = (m.raw("model") as Snapshot<OselmAutoencoderState>).state;
      if (pool.#optionMismatch(st) !== null) throw new SnapshotError(kind, `state.members[${i}].model`, "does not match the pool's member options");
      if (sharedHiddenLayer && st.seed !== `${seed}/shared`) throw new SnapshotError(kind, `state.members[${i}].model.state.seed`, `must be ${JSON.stringify(`${seed}/shared`)} with sharedHiddenLayer`);
      return { model, label: m.stringOrNull("label"), nearest: m.integer("nearest", 0, Number.MAX_SAFE_INTEGER), lastUsed: m.integer("lastUsed", -1, calls) };
    });
    pool.#members.push(...members);
    pool.#pending = pending;
    pool.#spawned = spawned;
    pool.#calls = calls;
    pool.#skipped = skipped;
    pool.#losses = new Float64Array(members.length);
    return pool;
  }

  /** The seed of the next member's hidden layer. */
  #memberSeed(): string {
    return this.#shared ? `${this.#seed}/shared` : `${this.#seed}/member/${this.#spawned}`;
  }

  #addFitted(rows: readonly ArrayLike<number>[], label: string | null): number {
    const model = new OselmAutoencoder({ ...this.#memberOptions, seed: this.#memberSeed() });
    model.fit(rows);
    this.#scored = false;
    this.#spawned++;
    this.#members.push({ model, label, nearest: 0, lastUsed: this.#calls });
    this.#losses = new Float64Array(this.#members.length);
    return this.#members.length - 1;
  }

  /** Rows to fit a member on: an array of vectors of the pool's length holding numbers only (E_SAMPLE or E_DIMENSION naming source[r]). */
  #sourceRows(source: unknown): readonly ArrayLike<number>[] {
    if (!Array.isArray(source)) throw new SampleError(COMPONENT, "source", source, "an array of input vectors or a FrozenModel");
    for (let r = 0; r < source.length; r++) requireNumbers(COMPONENT, `source[${r}]`, source[r], this.#n);
    return source;
  }

  /** A learning copy of a frozen model; E_OPTION unless it has the pool's member options. */
  #thawed(frozen: FrozenModel): OselmAutoencoder {
    const model = frozen.thaw();
    const why = this.#optionMismatch(model.snapshot().state);
    if (why !== null) throw new OptionError(COMPONENT, "source", `a FrozenModel with ${why}`, "a frozen model with the pool's member options");
    return model;
  }

  /** What in a member's state differs from the pool's member options, or null when nothing does. */
  #optionMismatch(st: OselmAutoencoderState): string | null {
    const o = this.#memberOptions;
    if (st.inputs !== this.#n || st.hidden !== this.#L) return `${st.inputs} inputs and ${st.hidden} hidden units`;
    if (st.activation !== (o.activation ?? "sigmoid")) return `activation ${st.activation}`;
    if (st.ridge !== (o.ridge ?? 0.01)) return `ridge ${st.ridge}`;
    if (st.forgetting !== (o.forgetting ?? 1)) return `forgetting ${st.forgetting}`;
    if (o.traceBound !== undefined && st.traceBound !== o.traceBound) return `trace bound ${st.traceBound}`;
    if (st.dtype !== (o.dtype ?? "float64")) return `dtype ${st.dtype}`;
    if (o.kernel !== undefined && st.kernel !== o.kernel) return `kernel ${st.kernel}`;
    if (st.scaling !== this.#scaling) return `scaling ${st.scaling}`;
    if (this.#shared && st.seed !== `${this.#seed}/shared`) return "no shared hidden layer";
    return null;
  }

  /** Scores x by every member into #losses; returns the nearest's index and counts it. */
  #scoreAll(x: ArrayLike<number>): number {
    const members = this.#members;
    const losses = this.#losses;
    let nearest = 0;
    const first = (members[0] as Member).model;
    for (let i = 0; i < members.length; i++) {
      const model = (members[i] as Member).model;
      const loss = i > 0 && this.#shared ? model[SCORE_SHARED](first) : model.score(x);
      losses[i] = loss;
      if (loss < (losses[nearest] as number)) nearest = i;
    }
    const m = members[nearest] as Member;
    m.nearest++;
    m.lastUsed = this.#calls;
    return nearest;
  }

  /**
   * Rethrows an error of a call already counted in #calls. A sample the call
   * refuses (any error but E_STATE, for example an input whose loss
   * overflows) un-counts it, so that a refused sample leaves the whole state
   * as it was; an update a member refuses as numerically unsafe (E_STATE)
   * stays counted, as the member counts it.
   */
  #uncount(error: unknown): never {
    if (!(error instanceof StateError)) this.#calls--;
    throw error;
  }

  /** The nearest member of the last score: the lowest loss, the first on ties. */
  #nearestScored(): number {
    const losses = this.#losses;
    let nearest = 0;
    for (let i = 1; i < losses.length; i++) if ((losses[i] as number) < (losses[nearest] as number)) nearest = i;
    return nearest;
  }

  /** Length and finiteness of x; false for a non-finite sample when not refusing. */
  #check(x: ArrayLike<number>, refuse: boolean): boolean {
    requireNumbers(COMPONENT, "x", x, this.#n);
    for (let j = 0; j < this.#n; j++) {
      const v = x[j] as number;
      if (!Number.isFinite(v)) {
        if (refuse) throw new NonFiniteError(COMPONENT, `x[${j}]`, v);
        return false;
      }
    }
    return true;
  }

  #member(member: number): Member {
    if (!Number.isInteger(member) || member < 0 || member >= this.#members.length) {
      throw new OptionError(COMPONENT, "member", member, this.#members.length === 0 ? "a member index, but the pool is empty" : `an integer in [0, ${this.#members.length - 1}]`);
    }
    return this.#members[member] as Member;
  }
}

function readRow(kind: string, path: string, value: unknown, length: number): Float64Array {
  if (!Array.isArray(value)) throw new SnapshotError(kind, path, "must be an array");
  if (value.length !== length) throw new SnapshotError(kind, path, `must have length ${length}, got length ${value.length}`);
  const row = new Float64Array(length);
  for (let j = 0; j < length; j++) {
    const v: unknown = value[j];
    if (typeof v !== "number" || !Number.isFinite(v)) throw new SnapshotError(kind, `${path}[${j}]`, "must be a finite number");
    row[j] = v;
  }
  return row;
}
