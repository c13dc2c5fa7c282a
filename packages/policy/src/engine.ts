import {
  DimensionError,
  envelope,
  integerInRange,
  NonFiniteError,
  openSnapshot,
  OptionError,
  optionsObject,
  StateError,
  type Snapshot,
} from "@leeway/core";
import type { Decision, Phase } from "./decision.js";
import { CORE_OPTIONS, FEATURE_OPTIONS, resolveCoreSettings, resolveSamplePeriod, type DecisionCoreOptions, type FeatureModelOptions } from "./options.js";
import { DecisionCore, type SampleScores } from "./decision-core.js";
import { FeatureModel, resolveFeatureSettings } from "./feature-model.js";
import type { Effect, Step } from "./effects.js";

/**
 * Options of {@link DecisionEngine}. Give `inputs` for feature mode (the
 * engine owns an autoencoder pool and its frozen references); leave it out
 * for score-only mode (the host scores with its own model and calls
 * {@link DecisionEngine.observeScores}).
 */
export type DecisionEngineOptions = DecisionCoreOptions &
  FeatureModelOptions & {
    /** Length of a feature vector (for example 256 spectrum bins). Absent: score-only mode. */
    inputs?: number;
    /** Seconds between samples, or a duration such as "10m" (default 1); spans given as durations, and the default spans, are turned into samples with it. */
    samplePeriod?: number | string;
  };

/** The plain state of a {@link DecisionEngine}. */
export interface DecisionEngineState {
  mode: "features" | "scores";
  core: Snapshot;
  model: Snapshot | null;
}

const NAME = "DecisionEngine";

/** The parts of a restored engine (only this module can make one). */
class RestoredParts {
  constructor(
    readonly core: DecisionCore,
    readonly model: FeatureModel | null,
  ) {}
}
const KNOWN = ["inputs", "samplePeriod", ...CORE_OPTIONS.names, ...FEATURE_OPTIONS.names] as const;

/**
 * The decision engine: one explained {@link Decision} per sample — learn it,
 * hold it, retrain, switch to a known mode, await confirmation, or raise an
 * alarm — separating concept drift (absorbed by a retrain or a mode switch)
 * from slow degradation (never absorbed) and from anomalies (never learnt).
 *
 * Feature mode (`inputs` given): the engine owns an {@link FeatureModel}
 * (an OS-ELM autoencoder pool as the live model, a lineage of frozen copies
 * as references, the settled samples of the last change) and carries out
 * every action itself. Score-only mode (`inputs` absent): the host scores
 * each sample with its own live model and references and passes the scores
 * to {@link DecisionEngine.observeScores}; it learns the samples the engine
 * says to learn, and answers a "retrain" decision with
 * {@link DecisionEngine.modelReplaced}. Both modes run the same
 * {@link DecisionCore}, so equal scores give equal decisions.
 *
 * A decision aid for condition monitoring, not a safety function.
 *
 * @example
 * const engine = new DecisionEngine({ commissioning: 50, calibration: 50, targetArl0: 500, seed: 1 });
 * let d = engine.observeScores(1);
 * for (let i = 1; i < 100; i++) d = engine.observeScores(1 + 0.1 * Math.sin(i));
 * [d.phase, engine.observeScores(1.05).action]; // ["commissioning", "learn"]
 * engine.phase; // "watching" (the 100th sample ended the calibration)
 */
export class DecisionEngine {
  static readonly kind = "leeway.policy.decision-engine";
  static readonly version = 1;
  readonly #core: DecisionCore;
  readonly #model: FeatureModel | null;
  readonly #refs = [0, 0];

  /** @param options see {@link DecisionEngineOptions}; the second parameter is used by {@link DecisionEngine.restore} only. */
  constructor(options: DecisionEngineOptions = {}, restored?: RestoredParts) {
    if (restored instanceof RestoredParts) {
      this.#core = restored.core;
      this.#model = restored.model;
      return;
    }
    const o = optionsObject<DecisionEngineOptions>(NAME, options, KNOWN);
    const settings = resolveCoreSettings(NAME, o as Record<string, unknown>, resolveSamplePeriod(NAME, o.samplePeriod));
    this.#core = new DecisionCore(NAME, settings);
    if (o.inputs === undefined) {
      for (const key of FEATURE_OPTIONS.names) {
        if (o[key] !== undefined) throw new OptionError(NAME, key, o[key], "absent in score-only mode (give inputs for feature mode)");
      }
      this.#model = null;
    } else {
      const inputs = integerInRange(NAME, "inputs", o.inputs, 1, 1 << 20);
      this.#model = new FeatureModel(resolveFeatureSettings(NAME, inputs, o as Record<string, unknown>, settings));
    }
  }

  /** "features" when the engine owns its model, "scores" in score-only mode. */
  get mode(): "features" | "scores" {
    return this.#model === null ? "scores" : "features";
  }
  /** Index of the last decided sample (−1 before the first). */
  get index(): number {
    return this.#core.index;
  }
  get phase(): Phase {
    return this.#core.phase;
  }
  /** Non-finite samples skipped under nonFinite "skip". */
  get skipped(): number {
    return this.#core.skipped;
  }
  /** Accepted retrains so far. */
  get retrains(): number {
    return this.#core.retrains;
  }
  /** Switches to a known mode so far. */
  get switches(): number {
    return this.#core.switches;
  }
  /** Alarms raised so far. */
  get alarms(): number {
    return this.#core.alarms;
  }
  /** True while a retrain waits for {@link DecisionEngine.confirmRetrain} or {@link DecisionEngine.rejectRetrain}. */
  get awaitingConfirmation(): boolean {
    return this.#core.pending;
  }
  /** Frozen references in the lineage (feature mode); in score-only mode the references calibrated so far. */
  get references(): number {
    return this.#model === null ? this.#core.newestId + 1 : this.#model.lineageSize;
  }
  /** The feature-mode model (pool and lineage), or null in score-only mode. */
  get model(): FeatureModel | null {
    return this.#model;
  }

  /**
   * Feature mode: scores `x` with the live pool and the references, decides,
   * and carries the decision out (learns it, keeps it for a retrain, retrains,
   * switches mode).
   */
  observe(x: Float64Array): Decision {
    const model = this.#model;
    if (model === null) throw new StateError(NAME, "observe(x) needs feature mode (inputs given); in score-only mode call observeScores(live, references)");
    if (!(x instanceof Float64Array)) throw new OptionError(NAME, "x", x, "a Float64Array");
    if (x.length !== model.inputs) throw new DimensionError(NAME, "x", model.inputs, x.length);
    for (let i = 0; i < x.length; i++) {
      if (!Number.isFinite(x[i] as number)) {
        if (this.#core.settings.nonFinite === "skip") return this.#core.skip().decision;
        throw new NonFiniteError(NAME, `x[${i}]`, x[i]);
      }
    }
    const core = this.#core;
    let step: Step = core.step(model.score(x, core.activeId, core.newestId));
    // The model carries out the effects in order; one whose result the decision depends on
    // (a refused learn, a retrain attempt, a member put in service) goes back to the core,
    // whose conclusion may add effects after the remaining ones.
    let queue = step.effects;
    for (let i = 0; i < queue.length; i++) {
      const outcome = model.carryOut(queue[i] as Effect, x);
      if (outcome === null) continue;
      step = core.conclude(step.decision, outcome);
      if (step.effects.length > 0) queue = [...queue, ...step.effects];
    }
    return step.decision;
  }

  /** Feature mode, many samples: the same decisions and state as calling {@link DecisionEngine.observe} on each. */
  observeMany(rows: readonly Float64Array[]): Decision[] {
    const out: Decision[] = new Array(rows.length);
    for (let i = 0; i < rows.length; i++) out[i] = this.observe(rows[i] as Float64Array);
    return out;
  }

  /**
   * Score-only mode: decides on one sample from the host's scores (score
   * units, ≥ 0): `live` from its live model, `references` from its frozen
   * references, `[commissioning]` or `[commissioning, newest]`. Without
   * references the live score serves as its own reference.
   */
  observeScores(live: number, references?: readonly number[]): Decision {
    if (this.#model !== null) throw new StateError(NAME, "observeScores() is for score-only mode; this engine owns its model (inputs given): call observe(x)");
    const refs = this.#refs;
    const n = references === undefined ? 0 : references.length;
    if (references !== undefined && !Array.isArray(references)) throw new OptionError(NAME, "references", references, "an array of 0, 1 or 2 scores");
    if (n > 2) throw new DimensionError(NAME, "references", 2, n);
    if (!this.#scoreOk(live, "live")) return this.#core.skip().decision;
    for (let i = 0; i < n; i++) {
      if (!this.#scoreOk((references as readonly number[])[i], `references[${i}]`)) return this.#core.skip().decision;
    }
    refs[0] = n > 0 ? ((references as readonly number[])[0] as number) : live;
    refs[1] = n > 1 ? ((references as readonly number[])[1] as number) : refs[0];
    const core = this.#core;
    const scores: SampleScores = { live, commissioning: refs[0], newest: refs[1], active: core.activeId === 0 ? refs[0] : refs[1] };
    return core.step(scores).decision; // the host reads the action; effects are for feature mode
  }

  /** Score-only mode, many samples: `live[i]` with `references[i]` (or none), as repeated {@link DecisionEngine.observeScores}. */
  observeScoresMany(live: Float64Array, references?: readonly (readonly number[])[]): Decision[] {
    if (references !== undefined && references.length !== live.length) throw new DimensionError(NAME, "references", live.length, references.length);
    const out: Decision[] = new Array(live.length);
    for (let i = 0; i < live.length; i++) out[i] = this.observeScores(live[i] as number, references?.[i]);
    return out;
  }

  #scoreOk(value: unknown, name: string): boolean {
    if (typeof value !== "number") throw new OptionError(NAME, name, value, "a finite score >= 0");
    if (!Number.isFinite(value)) {
      if (this.#core.settings.nonFinite === "skip") return false;
      throw new NonFiniteError(NAME, name, value);
    }
    if (value < 0) throw new OptionError(NAME, name, value, "a finite score >= 0");
    return true;
  }

  /**
   * Score-only mode: the host's new model (trained after a "retrain"
   * decision) is in service; its scores calibrate it as the newest reference
   * over the next `calibration` samples, which are held.
   */
  modelReplaced(): void {
    if (this.#model !== null) throw new StateError(NAME, "modelReplaced() is for score-only mode; in feature mode the engine retrains its own model");
    this.#core.modelReplaced();
  }

  /**
   * Operator: go ahead with the retrain awaiting confirmation (the new level is
   * the new normal); it runs on the next sample. E_STATE when none is pending.
   */
  confirmRetrain(): void {
    this.#core.confirmRetrain();
  }

  /**
   * Operator: refuse the retrain awaiting confirmation (or, in score-only
   * mode, report that the host could not retrain). After a drift the new level
   * is accepted without retraining; after an acknowledged anomaly whose level
   * persisted (a question with cause "anomaly") the engine keeps holding until
   * the scores return to normal. E_STATE when none is pending.
   */
  rejectRetrain(): void {
    if (this.#model !== null && !this.#core.pending) this.#core.confirmRetrain(); // throws the E_STATE message
    this.#core.rejectRetrain();
  }

  /** Operator: clear the alarm latch. E_STATE when no alarm is latched. */
  acknowledge(): void {
    this.#core.acknowledge();
  }

  /**
   * Operator-style event: this machine's whole site shifted (for example most
   * pumps of one room changed at once, as a fleet's site evidence finds). The
   * change under way, or the next change onset within `settlingLimit`
   * samples, is taken as concept drift: it settles instead of paging, then
   * retrains (or switches to a known mode) without asking; an anomaly latch
   * raised by that change within the window clears into settling. Never
   * covers a machine whose own degradation warning or alarm stands. Never
   * throws: what the report did appears as `evidence.siteShift` of the next
   * decision (and of the decisions it changes).
   */
  reportSiteShift(): void {
    this.#core.reportSiteShift();
  }

  /**
   * Operator: start a commissioning window of `n` samples (at 1 Hz, seconds),
   * all learnt as normal; then a new commissioning reference is frozen (a new
   * lineage begins) and every threshold is calibrated again. E_STATE during commissioning.
   */
  startCommissioning(n: number): void {
    const length = integerInRange(NAME, "n", n, 10, 2 ** 31 - 1);
    this.#core.startCommissioning(length);
  }

  /** The whole engine (models, lineage, tests, buffers) as plain data. */
  snapshot(): Snapshot<DecisionEngineState> {
    return envelope(DecisionEngine.kind, DecisionEngine.version, {
      mode: this.mode,
      core: this.#core.snapshot(),
      model: this.#model === null ? null : this.#model.snapshot(),
    });
  }

  /** Rebuilds an engine from {@link DecisionEngine.snapshot}; it continues bit for bit. */
  static restore(snapshot: unknown): DecisionEngine {
    const r = openSnapshot(snapshot, DecisionEngine.kind, DecisionEngine.version);
    const mode = r.oneOf("mode", ["features", "scores"] as const);
    const core = DecisionCore.restore(r.raw("core"), NAME);
    let model: FeatureModel | null = null;
    if (mode === "features") model = FeatureModel.restore(r.raw("model"), core);
    else if (r.raw("model") !== null) r.fail("model", "must be null in score-only mode");
    return new DecisionEngine({}, new RestoredParts(core, model));
  }
}
