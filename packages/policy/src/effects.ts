import type { Decision } from "./decision.js";
import type { ScoreLevel } from "./calibration.js";

/**
 * What the model side must carry out after a decision, as plain data. A
 * score-only host reads the decision's action instead; feature mode's
 * {@link FeatureModel} carries out each effect in order. An effect whose
 * result the decision depends on (a learn the autoencoder refuses, a retrain
 * attempt, a member put in service) reports an {@link EffectOutcome}, and the
 * core concludes the decision from it; nothing rewrites a decision it returned.
 */
export type Effect =
  /** Learn the sample with the nearest live member. */
  | { kind: "learn" }
  /** Freeze the live model (after this sample was learnt) as the commissioning reference. */
  | { kind: "freeze-commissioning" }
  /** Keep this sample's features at a ring position of the settling window. */
  | { kind: "keep"; position: number }
  /**
   * Try a retrain on the kept samples at `positions` (settling-window ring
   * positions, oldest first, outliers left out): first look for a lineage
   * reference other than those watched that scores them as normal, then train,
   * validate and adopt a candidate as lineage reference `newestId + 1`.
   */
  | { kind: "retrain"; positions: number[]; activeId: number; newestId: number; levels: (ScoreLevel | null)[]; knownModeLevel: number; scoreFloor: number; scoreClip: number; label: string }
  /** Make sure a pool member serves lineage reference `reference` (after a switch to it). */
  | { kind: "serve"; reference: number };

/** What an effect reported back (see {@link Effect}). */
export type EffectOutcome =
  | { kind: "learn-refused"; reason: string }
  | { kind: "known-mode"; reference: number }
  | { kind: "adopted"; validation: CandidateValidation; member: MemberChange }
  | { kind: "candidate-failed"; validation: CandidateValidation | null; error: string | null }
  | { kind: "served"; member: MemberChange };

/** A pool member put in service for a reference, and the reference whose member it replaced (−1: one that served none; null: nothing replaced). */
export interface MemberChange {
  member: number;
  servesReference: number;
  replacedReference: number | null;
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

/** One sample's decision and the effects the model side must carry out. */
export interface Step {
  decision: Decision;
  effects: readonly Effect[];
}

/** No effect (shared, never mutated). */
export const NO_EFFECTS: readonly Effect[] = Object.freeze([]);
/** Learn the sample, and nothing else (shared, never mutated). */
export const LEARN_ONLY: readonly Effect[] = Object.freeze([Object.freeze({ kind: "learn" as const })]);
