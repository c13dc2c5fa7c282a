import {
  integerInRange,
  OptionError,
  numberInRange,
  openSnapshot,
  envelope,
  toPlainArray,
  checkedSize,
  StateError,
  type Snapshot,
  type SnapshotReader,
} from "@leeway/core";
import { AutoencoderPool, FrozenModel, OselmAutoencoder } from "@leeway/pool";
import type { Decision, Evidence } from "./decision.js";
import type { DecisionCore } from "./core.js";
import type { CoreSettings } from "./options.js";
import { normalised } from "./calibration.js";

/** Options of the feature mode (ignored keys are refused in score-only mode). */
export interface FeatureModelOptions {
  /** Hidden units of every autoencoder (live members and candidates). Default 32. */
  hidden?: number;
  /** Members of the live pool, one per operating mode. Default 4. */
  members?: number;
  /** Ridge δ of the OS-ELM autoencoders (P₀ = I/δ). Default 0.01. */
  ridge?: number;
  /** Forgetting factor λ in (0, 1] of the live members (1: remember every learnt sample equally). Default 1. */
  forgetting?: number;
  /** Share of the settled samples held out to validate a candidate, in (0, 0.5]. Default 0.2. */
  validationShare?: number;
  /** A candidate passes when its held-out loss is at most this multiple of its training loss (and below the active reference's). Default 2. */
  validationTolerance?: number;
}

/** The validated feature-mode settings. */
export interface FeatureSettings {
  inputs: number;
  hidden: number;
  members: number;
  ridge: number;
  forgetting: number;
  validationShare: number;
  validationTolerance: number;
  settling: number;
  commissioning: number;
  seed: string;
}

/** The feature-mode option names. */
export const FEATURE_OPTION_NAMES = ["hidden", "members", "ridge", "forgetting", "validationShare", "validationTolerance"] as const;

/** Validates the feature-mode options. */
export function resolveFeatureSettings(component: string, inputs: number, o: FeatureModelOptions, core: CoreSettings): FeatureSettings {
  const settings: FeatureSettings = {
    inputs,
    hidden: integerInRange(component, "hidden", o.hidden ?? 32, 1, 4096),
    members: integerInRange(component, "members", o.members ?? 4, 1, 64),
    ridge: numberInRange(component, "ridge", o.ridge ?? 0.01, { min: 0, minExclusive: true }),
    forgetting: numberInRange(component, "forgetting", o.forgetting ?? 1, { min: 0, max: 1, minExclusive: true }),
    validationShare: numberInRange(component, "validationShare", o.validationShare ?? 0.2, { min: 0, max: 0.5, minExclusive: true }),
    validationTolerance: numberInRange(component, "validationTolerance", o.validationTolerance ?? 2, { min: 1 }),
    settling: core.settling,
    commissioning: core.commissioning,
    seed: String(core.seed),
  };
  // The empty pool fits its first member on `hidden` rows; the commissioning reference needs that member.
  if (core.commissioning <= settings.hidden) throw new OptionError(component, "commissioning", core.commissioning, `an integer > hidden = ${settings.hidden} in feature mode`);
  return settings;
}

/** How a candidate fared on the held-out settled samples (score units: mean squared reconstruction error). */
export interface CandidateValidation {
  trainingSamples: number;
  heldOutSamples: number;
  trainingLoss: number;
  heldOutLoss: number;
  /** The active reference's mean loss on the same held-out samples. */
  referenceLoss: number;
  passed: boolean;
}

/**
 * Feature mode's models: the live {@link AutoencoderPool} (OS-ELM
 * autoencoders, one member per operating mode), the lineage of frozen
 * references (the commissioning one, then one per accepted retrain), and the
 * rows kept while a change settles. It scores each sample, asks the
 * {@link DecisionCore}, and carries the decision out.
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

  constructor(settings: FeatureSettings) {
    this.settings = settings;
    this.#pool = new AutoencoderPool({ inputs: settings.inputs, hidden: settings.hidden, maxMembers: settings.members, ridge: settings.ridge, forgetting: settings.forgetting, seed: `${settings.seed}/pool` });
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

  /** Scores `x`, asks the core, and carries out its decision. */
  decide(core: DecisionCore, x: Float64Array): Decision {
    this.#syncServed();
    const scored = this.#pool.size > 0 ? this.#pool.score(x) : null;
    const live = scored === null ? 0 : finiteLoss(scored.loss);
    const member = scored === null ? -1 : scored.member;
    const lineage = this.#lineage;
    let commissioning = live;
    let newest = live;
    let active = live;
    if (lineage.length > 0) {
      commissioning = finiteLoss((lineage[0] as FrozenModel).score(x));
      const newestId = core.newestId;
      newest = newestId === 0 ? commissioning : finiteLoss((lineage[newestId] as FrozenModel).score(x));
      const activeId = core.activeId;
      active = activeId === 0 ? commissioning : activeId === newestId ? newest : finiteLoss((lineage[activeId] as FrozenModel).score(x));
    }
    const decision = core.step(live, commissioning, newest, active);
    if (decision.action === "learn") this.#learn(x, member, decision);
    if (core.freezeNow) {
      const frozen = member >= 0 ? member : 0;
      this.#lineage = [this.#pool.freeze(frozen)];
      this.#served = this.#served.map((_, i) => (i === frozen ? 0 : -1));
    }
    if (core.keptAt >= 0) this.#kept.set(x, core.keptAt * this.settings.inputs);
    if (decision.action === "retrain") this.#retrain(core, decision);
    if (decision.action === "switch-mode") this.#serve(core.switchedTo, decision.evidence);
    return decision;
  }

  /**
   * Learns x by the nearest member (or, in an empty pool, adds it to the run
   * that starts the first member). An update the autoencoder refuses as
   * numerically unsafe leaves the model as it was; the sample is then held
   * and the refusal is reported in the evidence (`learning`).
   */
  #learn(x: Float64Array, member: number, decision: Decision): void {
    try {
      this.#pool.learn(x, member >= 0 ? member : undefined);
    } catch (error) {
      if (!(error instanceof StateError)) throw error;
      decision.action = "hold";
      decision.evidence.learning = { refused: true, reason: error.message };
    }
    while (this.#served.length < this.#pool.size) this.#served.push(-1);
  }

  /** Members added to the pool from outside (through {@link FeatureModel.pool}) serve no reference. */
  #syncServed(): void {
    while (this.#served.length < this.#pool.size) this.#served.push(-1);
  }

  /**
   * Makes sure a pool member serves lineage reference `id` (after a switch to
   * it): when none does, a learning copy of the reference replaces the least
   * recently used member. Reported in the evidence as `member`.
   */
  #serve(id: number, evidence: Evidence): void {
    if (id < 0 || this.#served.includes(id)) return;
    const reference = this.#lineage[id];
    if (reference === undefined) return;
    const label = reference.label ?? (id === 0 ? "commissioning" : `reference-${id}`);
    const full = this.#pool.size >= this.#pool.maxMembers;
    const slot = full ? this.#pool.replaceMember(this.#pool.leastRecentlyUsed(), reference, label) : this.#pool.addMember(reference, label);
    while (this.#served.length < this.#pool.size) this.#served.push(-1);
    const replaced = full ? (this.#served[slot] as number) : null;
    this.#served[slot] = id;
    evidence.member = { member: slot, servesReference: id, replacedReference: replaced };
  }

  /** The kept settled rows (oldest first) and their normalised active scores. */
  #settledRows(core: DecisionCore): Float64Array[] {
    const window = core.settlingWindow;
    const positions = window.positions();
    const check = window.check();
    const limit = check.activeLevel + core.settings.settlingOutlier * Math.max(check.activeSpread, 1e-9);
    const n = this.settings.inputs;
    const rows: Float64Array[] = [];
    for (const p of positions) {
      if (window.activeAt(p) > limit) continue; // an outlier of the settled stream: held, never learnt
      rows.push(this.#kept.subarray(p * n, (p + 1) * n));
    }
    return rows;
  }

  #retrain(core: DecisionCore, decision: Decision): void {
    const rows = this.#settledRows(core);
    const evidence = decision.evidence;
    // A reference older than the two the core watches may already know this mode.
    const known = this.#olderKnownMode(core, rows);
    if (known >= 0) {
      core.retrainFailed();
      const switched = core.switchTo(known, evidence);
      decision.action = switched.action;
      decision.cause = switched.cause;
      decision.phase = switched.phase;
      return;
    }
    const every = Math.max(2, Math.round(1 / this.settings.validationShare));
    const training: Float64Array[] = [];
    const heldOut: Float64Array[] = [];
    rows.forEach((row, i) => ((i + 1) % every === 0 ? heldOut : training).push(row));
    let validation: CandidateValidation | null = null;
    let member = -1;
    let replaced: number | null = null;
    try {
      validation = this.#validate(core, training, heldOut);
      if (validation.passed) {
        const label = `retrain-${core.retrains + 1}`;
        // A full pool gives up its least recently used member; that mode lives on as its frozen reference.
        const full = this.#pool.size >= this.#pool.maxMembers;
        member = full ? this.#pool.replaceMember(this.#pool.leastRecentlyUsed(), rows, label) : this.#pool.addMember(rows, label);
        if (full) replaced = this.#served[member] as number;
      }
    } catch (error) {
      // The least-squares fit can be refused as numerically unsafe: the candidate failed.
      if (!(error instanceof StateError)) throw error;
      evidence.outcome = `candidate refused: ${error.message}`;
      member = -1;
    }
    if (validation !== null) evidence.candidate = validation;
    if (member < 0) {
      core.retrainFailed();
      decision.action = "hold";
      decision.phase = core.phase;
      return;
    }
    this.#lineage.push(this.#pool.freeze(member));
    while (this.#served.length < this.#pool.size) this.#served.push(-1);
    this.#served[member] = this.#lineage.length - 1;
    evidence.member = { member, servesReference: this.#lineage.length - 1, replacedReference: replaced };
    core.modelReplaced();
  }

  #validate(core: DecisionCore, training: Float64Array[], heldOut: Float64Array[]): CandidateValidation {
    const s = this.settings;
    if (training.length === 0) return { trainingSamples: 0, heldOutSamples: heldOut.length, trainingLoss: Number.NaN, heldOutLoss: Number.NaN, referenceLoss: Number.NaN, passed: false };
    const candidate = new OselmAutoencoder({ inputs: s.inputs, hidden: s.hidden, ridge: s.ridge, seed: `${s.seed}/candidate/${this.#candidates}` });
    this.#candidates += 1;
    candidate.fit(training);
    const reference = this.#lineage[core.activeId] as FrozenModel;
    const trainingLoss = meanScore(training, (x) => candidate.score(x));
    const heldOutLoss = meanScore(heldOut, (x) => candidate.score(x));
    const referenceLoss = meanScore(heldOut, (x) => reference.score(x));
    const passed = training.length > s.hidden && heldOut.length > 0 && heldOutLoss <= s.validationTolerance * trainingLoss && heldOutLoss < referenceLoss;
    return { trainingSamples: training.length, heldOutSamples: heldOut.length, trainingLoss, heldOutLoss, referenceLoss, passed };
  }

  /** A lineage reference other than the commissioning, newest and active ones that scores the settled rows as normal, or −1. */
  #olderKnownMode(core: DecisionCore, rows: Float64Array[]): number {
    const limit = core.settings.knownModeLevel;
    const floor = core.settings.scoreFloor;
    let best = -1;
    let bestLevel = limit;
    for (let id = 1; id < core.newestId; id++) {
      if (id === core.activeId) continue;
      const level = core.levelOf(id);
      const model = this.#lineage[id];
      if (level === null || model === undefined || rows.length === 0) continue;
      let sum = 0;
      for (const row of rows) sum += normalised(Math.log(model.score(row) + floor), level, core.settings.scoreClip);
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
    for (const key of FEATURE_OPTION_NAMES) raw[key] = o.raw(key);
    let settings: FeatureSettings;
    try {
      settings = resolveFeatureSettings("DecisionEngine", inputs, raw as FeatureModelOptions, core.settings);
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

/** A loss that overflowed (a finite input of absurd magnitude) counts as the largest finite score. */
function finiteLoss(loss: number): number {
  return loss < Number.MAX_VALUE ? loss : Number.MAX_VALUE;
}

function meanScore(rows: readonly Float64Array[], score: (x: Float64Array) => number): number {
  if (rows.length === 0) return Number.NaN;
  let sum = 0;
  for (const row of rows) sum += score(row);
  return sum / rows.length;
}
