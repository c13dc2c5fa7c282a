import { envelope, openSnapshot, type Snapshot } from "@leeway/core";

/** The settings the retrain gate reads. */
export interface RetrainGateSettings {
  retrainBudget: number;
  retrainHorizon: number;
  coolDown: number;
}

/** The plain state of a {@link RetrainGate}. */
export interface RetrainGateState {
  log: number[];
  coolDownUntil: number;
  pending: boolean;
  confirmed: boolean;
  askAfter: number;
}

/**
 * The guards in front of a retrain: a budget of attempts per horizon (failed
 * candidates count), a cool-down after each retrain or switch, and the
 * operator's question — pending until confirmed or rejected, and after a
 * rejection not asked again before a stated index.
 * @example
 * const g = new RetrainGate({ retrainBudget: 1, retrainHorizon: 100, coolDown: 10 });
 * g.start(5);
 * [g.exhausted(50), g.exhausted(105)]; // [true, false]
 */
export class RetrainGate {
  static readonly kind = "leeway.policy.retrain-gate";
  static readonly version = 1;
  readonly #s: RetrainGateSettings;
  #log: number[] = []; // indices of the attempts within the horizon
  #coolDownUntil = 0;
  #pending = false;
  #confirmed = false;
  #askAfter = 0;

  constructor(settings: RetrainGateSettings) {
    this.#s = settings;
  }

  /** True while a question waits for the operator (or its confirmed answer for the next sample). */
  get pending(): boolean {
    return this.#pending;
  }
  /** True when the operator confirmed and the retrain runs on the next sample. */
  get confirmed(): boolean {
    return this.#confirmed;
  }
  /** True while the question waits unanswered. */
  get waiting(): boolean {
    return this.#pending && !this.#confirmed;
  }
  get coolDownUntil(): number {
    return this.#coolDownUntil;
  }
  /** Attempts within the horizon at the last check. */
  get used(): number {
    return this.#log.length;
  }

  /** True when the budget of the horizon ending at `index` is spent. */
  exhausted(index: number): boolean {
    const horizon = this.#s.retrainHorizon;
    this.#log = this.#log.filter((at) => index - at < horizon);
    return this.#log.length >= this.#s.retrainBudget;
  }

  /** True inside the cool-down. */
  coolingDown(index: number): boolean {
    return index < this.#coolDownUntil;
  }

  /** True when a rejected question may not be asked again yet. */
  silenced(index: number): boolean {
    return index < this.#askAfter;
  }

  /** A retrain attempt starts at `index` (the question, if any, is answered). */
  start(index: number): void {
    this.#pending = false;
    this.#confirmed = false;
    this.#log.push(index);
  }

  /** A retrain or a switch took effect at `index`: the cool-down begins. */
  coolDownFrom(index: number): void {
    this.#coolDownUntil = index + this.#s.coolDown;
  }

  ask(): void {
    this.#pending = true;
  }
  confirm(): void {
    this.#confirmed = true;
  }
  /** The question is dropped (answered, overtaken by an alarm or a switch). */
  drop(): void {
    this.#pending = false;
    this.#confirmed = false;
  }
  /** The operator rejected the question; it is not asked again before `askAfter`. */
  silenceUntil(askAfter: number): void {
    this.#pending = false;
    this.#askAfter = askAfter;
  }
  /** Forgets the silence (a new episode). */
  unsilence(): void {
    this.#askAfter = 0;
  }

  snapshot(): Snapshot<RetrainGateState> {
    return envelope(RetrainGate.kind, RetrainGate.version, { log: [...this.#log], coolDownUntil: this.#coolDownUntil, pending: this.#pending, confirmed: this.#confirmed, askAfter: this.#askAfter });
  }

  static restore(snapshot: unknown, settings: RetrainGateSettings): RetrainGate {
    const r = openSnapshot(snapshot, RetrainGate.kind, RetrainGate.version);
    const big = Number.MAX_SAFE_INTEGER;
    const log = r.integers("log", { max: settings.retrainBudget + 1 }, 0, big);
    const coolDownUntil = r.integer("coolDownUntil", 0, big);
    const pending = r.boolean("pending");
    const confirmed = r.boolean("confirmed");
    if (confirmed && !pending) r.fail("confirmed", "can be true only while pending");
    const askAfter = r.integer("askAfter", 0, big);
    const g = new RetrainGate(settings);
    g.#log = log;
    g.#coolDownUntil = coolDownUntil;
    g.#pending = pending;
    g.#confirmed = confirmed;
    g.#askAfter = askAfter;
    return g;
  }
}
