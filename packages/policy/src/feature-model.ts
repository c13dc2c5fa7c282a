import {
  OptionError,
  openSnapshot,
  envelope,
  toPlainArray,
  checkedSize,
  StateError,
  SampleError,
  type Snapshot,
  type SnapshotReader,
} from "@leeway/core";
import { AutoencoderPool, FrozenModel, OselmAutoencoder } from "@leeway/pool";
import type { CoreSettings } from "./options.js";
import { FEATURE_OPTIONS, type FeatureOptionSettings } from "./options.js";
import type { DecisionCore, SampleScores } from "./decision-core.js";
import type { CandidateValidation, Effect, EffectOutcome } from "./effects.js";
import { normalised } from "./calibration.js";

/** The validated feature-mode settings, with the core's spans the models need. */
export interface FeatureSettings extends FeatureOptionSettings {
  inputs: number;
  settling: number;
  commissioning: number;
  seed: string;
}

/** Validates the feature-mode options. */
export function resolveFeatureSettings(component: string, inputs: number, o: Readonly<Record<string, unknown>>, core: CoreSettings): FeatureSettings {
  const settings: FeatureSettings = { inputs, ...FEATURE_OPTIONS.resolve(o), settling: core.settling, commissioning: core.commissioning, seed: String(core.seed) };
  // The empty pool fits its first member on `hidden` rows; the commissioning reference needs that member.
  if (core.commissioning <= settings.hidden) throw new OptionError(component, "commissioning", core.commissioning, `an integer > hidden = ${settings.hidden} in feature mode`);
  return settings;
}

/**
 * Feature mode's models: the live {@link AutoencoderPool} (OS-ELM
 * autoencoders, one member per operating mode), the lineage of frozen
 * references (the commissioning one, then one per accepted retrain), and the
 * rows kept while a change settles. The engine asks it for each sample's
 * scores, and it carries out the effects of the core's decision
 * ({@link FeatureModel.carryOut}).
 *
 * Each pool member remembers the lineage reference it serves (the one frozen
 * from it, or the one it was thawed from). A retrain adds the candidate's
 * member while the pool has room; a full pool replaces its least recently
 * used member (the one nearest least recently; with one member, that member):
 * the replaced mode survives as its frozen reference, so a later return is
 * still recognised as a known mode. A switch to a reference that no member
 * serves puts a learning copy of that reference in the place of the least
 * recently used member.
 *
 * @example
 * const engine = new DecisionEngine({ inputs: 8, hidden: 4, commissioning: 20, calibration: 20, seed: 1 });
 * for (let i = 0; i < 20; i++) engine.observe(Float64Array.from({ length: 8 }, (_, j) => 1 + 0.01 * Math.sin(i + j)));
 * [engine.model?.lineageSize, engine.model?.pool.size]; // [1, 1]: the commissioning reference is frozen
 */
export class FeatureModel {
  static readonly kind = "leeway.policy.feature-model";
  static readonly version = 2;
  readonly settings: FeatureSettings;
  #pool: AutoencoderPool;
  #lineage: FrozenModel[] = [];
  #served: number[] = []; // per pool member: the lineage id of the reference it serves, or −1
  readonly #kept: Float64Array; // settling × inputs, ring positions as in the core's settling window
  #candidates = 0;
  #nearest = -1; // the member nearest to the sample being decided, or −1
  readonly #residual: Float64Array; // the active reference's residual of the sample being decided

  constructor(settings: FeatureSettings) {
    this.settings = settings;
    this.#pool = new AutoencoderPool({ inputs: settings.inputs, hidden: settings.hidden, maxMembers: settings.members, ridge: settings.ridge, forgetting: settings.forgetting, seed: `${settings.seed}/pool` });
    this.#residual = new Float64Array(settings.inputs);
    this.#kept = new Float64Array(checkedSize("DecisionEngine", "settling × inputs", [settings.settling, settings.inputs]));
  }

  get inputs(): number {
    return this.settings.inputs;
  }
  /** Frozen references so far. */
  get lineageSize(): number {
    return this.#lineage.length;
  }
  /** The live pool (members added to it directly serve no reference of the lineage). */
  get pool(): AutoencoderPool {
    return this.#pool;
  }
  /** Per pool member, the lineage id of the reference it serves (frozen from it, or thawed from it), or −1. */
  get servedReferences(): readonly number[] {
    return [...this.#served];
  }
  /** A frozen reference of the lineage (0: commissioning). */
  reference(id: number): FrozenModel | undefined {
    return this.#lineage[id];
  }

  /**
   * Scores `x` with the live pool and with the references the core watches
   * (lineage ids `activeId` and `newestId`); the nearest member is remembered
   * for a learn effect of the same sample.
   */
  score(x: Float64Array, activeId: number, newestId: number): SampleScores {
    this.#syncServed();
    let live = 0;
    this.#nearest = -1;
    if (this.#pool.size > 0) {
      try {
        const scored = this.#pool.score(x);
        live = scored.loss;
        this.#nearest = scored.member;
      } catch (error) {
        if (!(error instanceof SampleError)) throw error;
        live = Number.MAX_VALUE; // the pool refuses an input whose loss overflows
      }
    }
    const lineage = this.#lineage;
    if (lineage.length === 0) return { live, commissioning: live, newest: live, active: live };
    const commissioning = scoreOrLargest(lineage[0] as FrozenModel, x);
    const newest = newestId === 0 ? commissioning : scoreOrLargest(lineage[newestId] as FrozenModel, x);
    const active = activeId === 0 ? commissioning : activeId === newestId ? newest : scoreOrLargest(lineage[activeId] as FrozenModel, x);
    // Each reference keeps its own last residual, so the active one's is still that of x (none when its score was refused).
    const residual = active === Number.MAX_VALUE ? undefined : (lineage[activeId] as FrozenModel).residual(this.#residual);
    return residual === undefined ? { live, commissioning, newest, active } : { live, commissioning, newest, active, residual };
  }

  /** Carries out one effect of the core's step on sample `x`; returns what the decision depends on, or null. */
  carryOut(effect: Effect, x: Float64Array): EffectOutcome | null {
    switch (effect.kind) {
      case "learn":
        return this.#learn(x);
      case "freeze-commissioning": {
        if (this.#pool.size === 0) this.#addPriorMember();
        const frozen = this.#nearest >= 0 ? this.#nearest : 0;
        this.#lineage = [this.#pool.freeze(frozen)];
        this.#served = this.#served.map((_, i) => (i === frozen ? 0 : -1));
        return null;
      }
      case "keep":
        this.#kept.set(x, effect.position * this.settings.inputs);
        return null;
      case "retrain":
        return this.#retrain(effect);
      case "serve":
        return this.#serve(effect.reference);
    }
  }

  /**
   * Learns x by the nearest member (or, in an empty pool, adds it to the run
   * that starts the first member). The member reuses the forward pass of this
   * sample's score when nothing has changed the pool since (no second pass).
   * An update the autoencoder refuses as numerically unsafe leaves the model
   * as it was and is reported.
   */
  #learn(x: Float64Array): EffectOutcome | null {
    const member = this.#nearest;
    const pool = this.#pool;
    try {
      if (member >= 0 && pool.scored) pool.learnScored(member);
      else pool.learn(x, member >= 0 ? member : undefined);
    } catch (error) {
      // refused as numerically unsafe (E_STATE), or an input whose loss overflows (E_SAMPLE)
      if (!(error instanceof StateError) && !(error instanceof SampleError)) throw error;
      return { kind: "learn-refused", reason: error.message };
    } finally {
      this.#syncServed();
    }
    return null;
  }

  /**
   * When every fit of the commissioning run was refused (samples too large
   * for the model's state range), the pool's first member is the untrained
   * model (β = 0, P = I/ridge) from the member seed the pool would have used,
   * so that commissioning still ends with a reference to freeze.
   */
  #addPriorMember(): void {
    const s = this.settings;
    const prior = new OselmAutoencoder({ inputs: s.inputs, hidden: s.hidden, ridge: s.ridge, forgetting: s.forgetting, seed: `${s.seed}/pool/member/0` });
    this.#pool.addMember(FrozenModel.from(prior));
    this.#syncServed();
  }

  /** Members added to the pool from outside (through {@link FeatureModel.pool}) serve no reference. */
  #syncServed(): void {
    while (this.#served.length < this.#pool.size) this.#served.push(-1);
  }

  /**
   * Makes sure a pool member serves lineage reference `id` (after a switch to
   * it): when none does, a learning copy of the reference replaces the least
   * recently used member.
   */
  #serve(id: number): EffectOutcome | null {
    if (id < 0 || this.#served.includes(id)) return null;
    const reference = this.#lineage[id];
    if (reference === undefined) return null;
    const label = reference.label ?? (id === 0 ? "commissioning" : `reference-${id}`);
    const full = this.#pool.size >= this.#pool.maxMembers;
    const slot = full ? this.#pool.replaceMember(this.#pool.leastRecentlyUsed(), reference, label) : this.#pool.addMember(reference, label);
    this.#syncServed();
    const replaced = full ? (this.#served[slot] as number) : null;
    this.#served[slot] = id;
    return { kind: "served", member: { member: slot, servesReference: id, replacedReference: replaced } };
  }

  /**
   * A retrain attempt on the kept rows: an older reference that knows the
   * mode is switched to; otherwise a candidate is trained on all but a
   * held-out share and validated, and when it passes the pool gains a member
   * fitted on every row (a full pool gives up its least recently used
   * member; that mode lives on as its frozen reference), frozen as the
   * newest lineage reference.
   */
  #retrain(effect: Extract<Effect, { kind: "retrain" }>): EffectOutcome {
    const n = this.settings.inputs;
    const rows = effect.positions.map((p) => this.#kept.subarray(p * n, (p + 1) * n));
    const known = this.#olderKnownMode(effect, rows);
    if (known >= 0) return { kind: "known-mode", reference: known };
    const every = Math.max(2, Math.round(1 / this.settings.validationShare));
    const training: Float64Array[] = [];
    const heldOut: Float64Array[] = [];
    rows.forEach((row, i) => ((i + 1) % every === 0 ? heldOut : training).push(row));
    let validation: CandidateValidation | null = null;
    try {
      validation = this.#validate(effect.activeId, training, heldOut);
      if (!validation.passed) return { kind: "candidate-failed", validation, error: null };
      const full = this.#pool.size >= this.#pool.maxMembers;
      const member = full ? this.#pool.replaceMember(this.#pool.leastRecentlyUsed(), rows, effect.label) : this.#pool.addMember(rows, effect.label);
      const replaced = full ? (this.#served[member] as number) : null;
      this.#lineage.push(this.#pool.freeze(member));
      this.#syncServed();
      this.#served[member] = this.#lineage.length - 1;
      return { kind: "adopted", validation, member: { member, servesReference: this.#lineage.length - 1, replacedReference: replaced } };
    } catch (error) {
      // The least-squares fit can be refused as numerically unsafe: the candidate failed.
      if (!(error instanceof StateError)) throw error;
      return { kind: "candidate-failed", validation, error: error.message };
    }
  }

  #validate(activeId: number, training: Float64Array[], heldOut: Float64Array[]): CandidateValidation {
    const s = this.settings;
    if (training.length === 0) return { trainingSamples: 0, heldOutSamples: heldOut.length, trainingLoss: Number.NaN, heldOutLoss: Number.NaN, referenceLoss: Number.NaN, passed: false };
    const candidate = new OselmAutoencoder({ inputs: s.inputs, hidden: s.hidden, ridge: s.ridge, seed: `${s.seed}/candidate/${this.#candidates}` });
    this.#candidates += 1;
    candidate.fit(training);
    const reference = this.#lineage[activeId] as FrozenModel;
    const trainingLoss = meanScore(training, candidate);
    const heldOutLoss = meanScore(heldOut, candidate);
    const referenceLoss = meanScore(heldOut, reference);
    const passed = training.length > s.hidden && heldOut.length > 0 && heldOutLoss <= s.validationTolerance * trainingLoss && heldOutLoss < referenceLoss;
    return { trainingSamples: training.length, heldOutSamples: heldOut.length, trainingLoss, heldOutLoss, referenceLoss, passed };
  }

  /** A lineage reference other than the commissioning, newest and active ones that scores the settled rows as normal, or −1. */
  #olderKnownMode(effect: Extract<Effect, { kind: "retrain" }>, rows: Float64Array[]): number {
    let best = -1;
    let bestLevel = effect.knownModeLevel;
    for (let id = 1; id < effect.newestId; id++) {
      if (id === effect.activeId) continue;
      const level = effect.levels[id] ?? null;
      const model = this.#lineage[id];
      if (level === null || model === undefined || rows.length === 0) continue;
      let sum = 0;
      for (const row of rows) sum += normalised(Math.log(scoreOrLargest(model, row) + effect.scoreFloor), level, effect.scoreClip);
      const mean = Math.abs(sum / rows.length);
      if (mean < bestLevel) {
        best = id;
        bestLevel = mean;
      }
    }
    return best;
  }

  snapshot(): Snapshot {
    const s = this.settings;
    return envelope(FeatureModel.kind, FeatureModel.version, {
      inputs: s.inputs,
      options: { hidden: s.hidden, members: s.members, ridge: s.ridge, forgetting: s.forgetting, validationShare: s.validationShare, validationTolerance: s.validationTolerance },
      pool: this.#pool.snapshot(),
      lineage: this.#lineage.map((m) => m.snapshot()),
      served: (this.#syncServed(), [...this.#served]),
      kept: toPlainArray(this.#kept),
      candidates: this.#candidates,
    });
  }

  /** Rebuilds the models; the core (already restored) fixes the sizes they must have. */
  static restore(snapshot: unknown, core: DecisionCore): FeatureModel {
    const r: SnapshotReader = openSnapshot(snapshot, FeatureModel.kind, FeatureModel.version);
    const inputs = r.integer("inputs", 1, 1 << 20);
    const o = r.object("options");
    const raw: Record<string, unknown> = {};
    for (const key of FEATURE_OPTIONS.names) raw[key] = o.raw(key);
    let settings: FeatureSettings;
    try {
      settings = resolveFeatureSettings("DecisionEngine", inputs, raw, core.settings);
    } catch (error) {
      r.fail("options", `are not valid options: ${(error as Error).message}`);
    }
    checkedSize(FeatureModel.kind, "state.kept", [settings.settling, inputs]);
    const pool = AutoencoderPool.restore(r.raw("pool"));
    const lineageRaw = r.rawArray("lineage", { max: core.newestId + 1 });
    if (core.phase !== "commissioning" && lineageRaw.length !== core.newestId + 1) r.fail("lineage", `must have length ${core.newestId + 1}, got length ${lineageRaw.length}`);
    if (pool.inputs !== inputs || pool.hidden !== settings.hidden || pool.maxMembers !== settings.members) {
      r.fail("pool", `must have ${inputs} inputs, ${settings.hidden} hidden units and room for ${settings.members} members`);
    }
    // After commissioning the pool holds at least the commissioning member (a full pool replaces members, so the lineage may outgrow it).
    if (core.phase !== "commissioning" && pool.size < 1) r.fail("pool", `must hold at least 1 member, got ${pool.size}`);
    const lineage = lineageRaw.map((s) => FrozenModel.restore(s));
    for (const m of lineage) if (m.inputs !== inputs) r.fail("lineage", `references must have ${inputs} inputs, got ${m.inputs}`);
    const served = r.integers("served", { max: settings.members }, -1, Math.max(-1, lineage.length - 1));
    if (served.length !== pool.size) r.fail("served", `must have one entry per pool member (${pool.size}), got length ${served.length}`);
    for (let i = 0; i < served.length; i++) {
      const id = served[i] as number;
      if (id >= 0 && served.indexOf(id) !== i) r.fail("served", `names reference ${id} for two members`);
    }
    const kept = r.numbers("kept", settings.settling * settings.inputs);
    const candidates = r.integer("candidates", 0, Number.MAX_SAFE_INTEGER);
    const model = new FeatureModel(settings);
    model.#pool = pool;
    model.#lineage = lineage;
    model.#served = served;
    model.#kept.set(kept);
    model.#candidates = candidates;
    return model;
  }
}

/**
 * The model's score of x; an input whose loss overflows (a finite input of
 * absurd magnitude, which the model refuses with E_SAMPLE) counts as the
 * largest finite score.
 */
function scoreOrLargest(model: { score(x: Float64Array): number }, x: Float64Array): number {
  try {
    return model.score(x);
  } catch (error) {
    if (!(error instanceof SampleError)) throw error;
    return Number.MAX_VALUE;
  }
}

function meanScore(rows: readonly Float64Array[], model: { score(x: Float64Array): number }): number {
  if (rows.length === 0) return Number.NaN;
  let sum = 0;
  for (const row of rows) sum += scoreOrLargest(model, row);
  return sum / rows.length;
}
