import type { Decision } from "./decision.js";
import type { DecisionEngine } from "./engine.js";

/** What the simulated operator did, and when (after which sample). */
export interface OperatorAction {
  index: number;
  action: "acknowledge" | "confirm-retrain";
}

/**
 * A scripted operator for replays and the demo, where no person is at hand:
 * it acknowledges an alarm that has stayed latched for `acknowledgeAfter`
 * samples and confirms a retrain that has awaited confirmation for
 * `confirmAfter` samples (null: never). Without it a latched alarm stays
 * latched to the end of the stream, as it would with nobody on duty.
 * @example
 * const operator = new ScriptedOperator(engine, { acknowledgeAfter: 60, confirmAfter: null });
 * const d = engine.observe(x);
 * operator.after(d); // may call engine.acknowledge()
 */
export class ScriptedOperator {
  readonly #engine: DecisionEngine;
  readonly #acknowledgeAfter: number | null;
  readonly #confirmAfter: number | null;
  #latchedFor = 0;
  #waitingFor = 0;
  readonly actions: OperatorAction[] = [];

  constructor(engine: DecisionEngine, options: { acknowledgeAfter: number | null; confirmAfter: number | null }) {
    this.#engine = engine;
    this.#acknowledgeAfter = options.acknowledgeAfter;
    this.#confirmAfter = options.confirmAfter;
  }

  /** Looks at the decision just taken and acts when a wait has run out; `at` is the index recorded with an action (default the decision's). */
  after(decision: Decision, at: number = decision.index): void {
    this.#latchedFor = decision.phase === "latched" ? this.#latchedFor + 1 : 0;
    this.#waitingFor = this.#engine.awaitingConfirmation ? this.#waitingFor + 1 : 0;
    if (this.#acknowledgeAfter !== null && this.#latchedFor >= this.#acknowledgeAfter) {
      this.#engine.acknowledge();
      this.actions.push({ index: at, action: "acknowledge" });
      this.#latchedFor = 0;
    }
    if (this.#confirmAfter !== null && this.#waitingFor >= this.#confirmAfter) {
      this.#engine.confirmRetrain();
      this.actions.push({ index: at, action: "confirm-retrain" });
      this.#waitingFor = 0;
    }
  }
}
