import { OptionError } from "@leeway/core";
import { ACTIONS, CAUSES, PHASES, type Action, type Cause, type Decision, type Phase } from "@leeway/policy";

const INITIAL_CAPACITY = 1024;

/**
 * A compact record of a decision timeline: per sample the action, cause and
 * phase (one byte each) and the live and first reference score (float64) —
 * 19 bytes a sample instead of a retained decision object, so that the
 * metrics of a long replay (10^7 samples ≈ 190 MB) can be computed without
 * keeping every decision. Positions are 0-based in recording order; they, not
 * `decision.index`, are what the metrics use.
 * @example
 * const timeline = new Timeline();
 * timeline.record({ index: 0, action: "alarm", cause: "anomaly", phase: "watching", evidence: { liveScore: 3.5, referenceScores: [4] } });
 * timeline.length;      // 1
 * timeline.actionAt(0); // "alarm"
 * timeline.referenceScoreAt(0); // 4
 */
export class Timeline {
  #length = 0;
  #actions = new Uint8Array(INITIAL_CAPACITY);
  #causes = new Uint8Array(INITIAL_CAPACITY);
  #phases = new Uint8Array(INITIAL_CAPACITY);
  #live = new Float64Array(INITIAL_CAPACITY);
  // NaN marks "no reference score given" (referenceScores was empty).
  #reference = new Float64Array(INITIAL_CAPACITY);

  /** Number of decisions recorded. */
  get length(): number {
    return this.#length;
  }

  // The last string seen per field and its code: consecutive decisions mostly repeat them.
  #lastAction: string = ACTIONS[0] as string;
  #lastActionCode = 0;
  #lastCause: string = CAUSES[0] as string;
  #lastCauseCode = 0;
  #lastPhase: string = PHASES[0] as string;
  #lastPhaseCode = 0;

  /** Appends one decision. Its action, cause and phase must be from the policy vocabulary. */
  record(decision: Decision): void {
    if (decision.action !== this.#lastAction) {
      this.#lastActionCode = codeOf(ACTION_CODES, "decision.action", decision.action);
      this.#lastAction = decision.action;
    }
    if (decision.cause !== this.#lastCause) {
      this.#lastCauseCode = codeOf(CAUSE_CODES, "decision.cause", decision.cause);
      this.#lastCause = decision.cause;
    }
    if (decision.phase !== this.#lastPhase) {
      this.#lastPhaseCode = codeOf(PHASE_CODES, "decision.phase", decision.phase);
      this.#lastPhase = decision.phase;
    }
    const evidence = decision.evidence;
    const live = evidence.liveScore;
    if (typeof live !== "number") throw new OptionError("Timeline", "decision.evidence.liveScore", live, "a number");
    const references = evidence.referenceScores;
    if (!Array.isArray(references)) throw new OptionError("Timeline", "decision.evidence.referenceScores", references, "an array of numbers");
    const first = references.length > 0 ? references[0] : Number.NaN;
    if (typeof first !== "number") throw new OptionError("Timeline", "decision.evidence.referenceScores[0]", first, "a number");
    if (this.#length === this.#actions.length) this.#grow();
    const i = this.#length++;
    this.#actions[i] = this.#lastActionCode;
    this.#causes[i] = this.#lastCauseCode;
    this.#phases[i] = this.#lastPhaseCode;
    this.#live[i] = live;
    this.#reference[i] = first;
  }

  /** The action of the decision at position i. */
  actionAt(i: number): Action {
    return ACTIONS[this.#codeAt(this.#actions, i)] as Action;
  }

  /** The cause of the decision at position i. */
  causeAt(i: number): Cause {
    return CAUSES[this.#codeAt(this.#causes, i)] as Cause;
  }

  /** The phase of the decision at position i. */
  phaseAt(i: number): Phase {
    return PHASES[this.#codeAt(this.#phases, i)] as Phase;
  }

  /** The live score at position i (as given; may be non-finite if the pipeline produced one). */
  liveScoreAt(i: number): number {
    this.#check(i);
    return this.#live[i] as number;
  }

  /** The first reference score at position i, or null when the decision gave none. */
  referenceScoreAt(i: number): number | null {
    this.#check(i);
    const r = this.#reference[i] as number;
    return Number.isNaN(r) ? null : r;
  }

  /** Action codes (indices into `ACTIONS` of `@leeway/policy`), a view of the first `length` entries. */
  actionCodes(): Uint8Array {
    return this.#actions.subarray(0, this.#length);
  }

  /** Cause codes (indices into `CAUSES`), a view. */
  causeCodes(): Uint8Array {
    return this.#causes.subarray(0, this.#length);
  }

  /** Phase codes (indices into `PHASES`), a view. */
  phaseCodes(): Uint8Array {
    return this.#phases.subarray(0, this.#length);
  }

  /** Live scores, a view. */
  liveScores(): Float64Array {
    return this.#live.subarray(0, this.#length);
  }

  /** First reference scores, a view; NaN where a decision gave no reference score. */
  referenceScores(): Float64Array {
    return this.#reference.subarray(0, this.#length);
  }

  #codeAt(codes: Uint8Array, i: number): number {
    this.#check(i);
    return codes[i] as number;
  }

  #check(i: number): void {
    if (!Number.isInteger(i) || i < 0 || i >= this.#length) {
      throw new OptionError("Timeline", "position", i, `an integer in [0, ${this.#length - 1}]`);
    }
  }

  #grow(): void {
    const capacity = this.#actions.length * 2;
    this.#actions = grown(this.#actions, new Uint8Array(capacity));
    this.#causes = grown(this.#causes, new Uint8Array(capacity));
    this.#phases = grown(this.#phases, new Uint8Array(capacity));
    this.#live = grown(this.#live, new Float64Array(capacity));
    this.#reference = grown(this.#reference, new Float64Array(capacity));
  }
}

const ACTION_CODES = new Map<string, number>(ACTIONS.map((a, i) => [a, i]));
const CAUSE_CODES = new Map<string, number>(CAUSES.map((c, i) => [c, i]));
const PHASE_CODES = new Map<string, number>(PHASES.map((p, i) => [p, i]));

function codeOf(codes: Map<string, number>, parameter: string, value: unknown): number {
  const code = typeof value === "string" ? codes.get(value) : undefined;
  if (code === undefined) throw new OptionError("Timeline", parameter, value, `one of ${[...codes.keys()].join(", ")}`);
  return code;
}

function grown<T extends Uint8Array | Float64Array>(from: T, to: T): T {
  to.set(from);
  return to;
}
