import type { MachineInspection, QualityOperator } from "@leeway/eval";
import { ScriptedOperator, type Decision, type DecisionEngine } from "@leeway/policy";

/** How long the suite's operator takes to answer an alarm or a question, in seconds. */
export const OPERATOR_ANSWER_SECONDS = 300;

/**
 * The operator of the suite's attended engine: a {@link ScriptedOperator}
 * acknowledges each alarm five minutes after it latched (at least one sample
 * later); a question ("await-confirmation") is answered after the same wait
 * the way a person who inspects the machine would: the retrain is confirmed
 * when nothing is wrong with the machine at that moment (the change was
 * benign) and rejected while a fault or a degradation is under way.
 * @example
 * const operator = scriptedQualityOperator(engine, 600, () => true); // answers after 1 sample at one sample per ten minutes
 */
export function scriptedQualityOperator(engine: DecisionEngine, samplePeriod: number, inspect: MachineInspection): QualityOperator {
  const after = Math.max(1, Math.round(OPERATOR_ANSWER_SECONDS / samplePeriod));
  const acknowledger = new ScriptedOperator(engine, { acknowledgeAfter: after, confirmAfter: null });
  let waitingFor = 0;
  return {
    after(decision: Decision): void {
      acknowledger.after(decision);
      waitingFor = engine.awaitingConfirmation ? waitingFor + 1 : 0;
      if (waitingFor < after) return;
      if (inspect(decision.index)) engine.confirmRetrain();
      else engine.rejectRetrain();
      waitingFor = 0;
    },
  };
}
