/**
 * The vocabulary of the decision engine (DESIGN.md, "Vocabulary"). Every
 * sample the engine sees gets one {@link Decision}.
 */

/** What the engine does with the sample, or asks the host to do. */
export type Action = "learn" | "hold" | "retrain" | "switch-mode" | "alarm" | "await-confirmation";

/** Why. */
export type Cause = "normal" | "commissioning" | "anomaly" | "concept-drift" | "degradation" | "known-mode" | "operator";

/** Where the engine is in its cycle when it decides. */
export type Phase = "commissioning" | "watching" | "settling" | "retraining" | "latched";

export const ACTIONS: readonly Action[] = ["learn", "hold", "retrain", "switch-mode", "alarm", "await-confirmation"];
export const CAUSES: readonly Cause[] = ["normal", "commissioning", "anomaly", "concept-drift", "degradation", "known-mode", "operator"];
export const PHASES: readonly Phase[] = ["commissioning", "watching", "settling", "retraining", "latched"];

/**
 * The numbers behind a decision. `liveScore` and `referenceScores` are always
 * present; the other fields appear when the evidence they hold took part.
 */
export interface Evidence {
  /** Score of the sample under the live model. */
  liveScore: number;
  /** Scores under the frozen references: the commissioning one first, then the newest (when different). */
  referenceScores: number[];
  [detail: string]: unknown;
}

/** One decision per sample. */
export interface Decision {
  /** Index of the sample in the engine's stream (0-based). */
  index: number;
  action: Action;
  cause: Cause;
  phase: Phase;
  evidence: Evidence;
}
