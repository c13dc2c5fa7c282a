import type { Decision } from "./decision.js";
import type { DecisionEngine } from "./engine.js";
import { ScriptedOperator } from "./scripted-operator.js";

/**
 * One decision engine per operating mode, for hosts that know the mode of
 * every sample (a speed setpoint read from the drive, a valve position): each
 * sample goes to the engine of its mode, so every engine sees one stationary
 * regime and its long trend windows are never cut by mode changes (the
 * arrangement the policy guide recommends). Engines are made on the first
 * sample of their mode. The decisions come back renumbered in stream order,
 * with the mode added to the evidence (`evidence.mode`) and the engine's own
 * sample index (`evidence.modeIndex`).
 * @example
 * const router = new ModeRouter((mode) => new DecisionEngine({ inputs: 256, seed: `ps2/${mode}` }));
 * const d = router.observe(spectrum, "mid");
 * d.evidence.mode; // "mid"
 */
export class ModeRouter {
  readonly #make: (mode: string) => DecisionEngine;
  readonly #operator: { acknowledgeAfter: number | null; confirmAfter: number | null } | null;
  readonly #engines = new Map<string, { engine: DecisionEngine; operator: ScriptedOperator | null }>();
  #index = 0;

  /**
   * @param make builds the engine of a mode (called once per mode)
   * @param operator a scripted operator per engine (see {@link ScriptedOperator}), or null for none
   */
  constructor(make: (mode: string) => DecisionEngine, operator: { acknowledgeAfter: number | null; confirmAfter: number | null } | null = null) {
    this.#make = make;
    this.#operator = operator;
  }

  /** Decides on a feature vector of the given mode (feature-mode engines). */
  observe(x: Float64Array, mode: string): Decision {
    const entry = this.#entry(mode);
    return this.#renumber(entry, entry.engine.observe(x), mode);
  }

  /** Decides on the scores of a sample of the given mode (score-only engines; see `DecisionEngine.observeScores`). */
  observeScores(live: number, references: readonly number[] | undefined, mode: string): Decision {
    const entry = this.#entry(mode);
    return this.#renumber(entry, references === undefined ? entry.engine.observeScores(live) : entry.engine.observeScores(live, references), mode);
  }

  #entry(mode: string): { engine: DecisionEngine; operator: ScriptedOperator | null } {
    let entry = this.#engines.get(mode);
    if (entry === undefined) {
      const engine = this.#make(mode);
      entry = { engine, operator: this.#operator === null ? null : new ScriptedOperator(engine, this.#operator) };
      this.#engines.set(mode, entry);
    }
    return entry;
  }

  #renumber(entry: { engine: DecisionEngine; operator: ScriptedOperator | null }, d: Decision, mode: string): Decision {
    const index = this.#index++;
    entry.operator?.after(d, index);
    return { index, action: d.action, cause: d.cause, phase: d.phase, evidence: { ...d.evidence, mode, modeIndex: d.index } };
  }

  /** The modes seen so far, in order of their first sample. */
  get modes(): string[] {
    return [...this.#engines.keys()];
  }

  /** The engine of a mode, once it has seen a sample. */
  engine(mode: string): DecisionEngine | undefined {
    return this.#engines.get(mode)?.engine;
  }

  /** Everything the scripted operators did, with stream indices, in order. */
  operatorActions(): { index: number; mode: string; action: string }[] {
    const out: { index: number; mode: string; action: string }[] = [];
    for (const [mode, e] of this.#engines) for (const a of e.operator?.actions ?? []) out.push({ index: a.index, mode, action: a.action });
    return out.sort((a, b) => a.index - b.index);
  }
}
