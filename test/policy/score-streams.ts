import type { Decision, DecisionEngine } from "@leeway/policy";
import { RandomSource } from "@leeway/core";

/**
 * A host with its own models, for score-only tests: the world has an
 * operating-mode offset m(t) and a degradation d(t) (both on the log-score
 * scale); a model trained at offset m_k scores a sample as
 * exp(base + gain·|m(t) − m_k| + d(t) − absorbed + noise), with AR(1) noise.
 * The live model absorbs a share of the degradation (it keeps learning);
 * frozen references absorb none. Invented numbers, for tests only.
 */
export interface World {
  mode: number;
  degradation: number;
  /** An extra log-score jump of the live model only (an abrupt fault seen by every model). */
  fault: number;
}

export class ScoreHost {
  readonly #random: RandomSource;
  readonly #base: number;
  readonly #sd: number;
  readonly #rho: number;
  #noise = 0;
  /** Offsets the frozen references were trained at: [commissioning, newest]. */
  readonly models: number[] = [0];
  /** Share of the degradation the live model has absorbed (grows while it learns a degrading stream). */
  absorbed = 0;
  liveMode = 0;

  constructor(seed: number, options: { base?: number; sd?: number; rho?: number } = {}) {
    this.#random = new RandomSource(seed);
    this.#base = options.base ?? Math.log(0.02);
    this.#sd = options.sd ?? 0.2;
    this.#rho = options.rho ?? 0.3;
  }

  /** Scores one sample of the world: live and [commissioning, newest]. */
  score(world: World): { live: number; references: number[] } {
    this.#noise = this.#rho * this.#noise + Math.sqrt(1 - this.#rho * this.#rho) * this.#random.normal(0, this.#sd);
    const at = (offset: number, extra: number): number => Math.exp(this.#base + 3 * Math.abs(world.mode - offset) + extra + world.fault + this.#noise);
    const live = at(this.liveMode, world.degradation - this.absorbed);
    const first = this.models[0] as number;
    const last = this.models[this.models.length - 1] as number;
    const references = this.models.length === 1 ? [at(first, world.degradation)] : [at(first, world.degradation), at(last, world.degradation)];
    return { live, references };
  }

  /** The host retrains: a new model at the world's present mode (and degradation: a retrain during degradation absorbs it). */
  retrain(world: World): void {
    this.models.push(world.mode);
    this.liveMode = world.mode;
    this.absorbed = world.degradation;
  }
}

/** What a run of an engine over a scripted world did. */
export interface HostRun {
  decisions: Decision[];
  retrains: number[];
  switches: number[];
  alarms: Decision[];
  /** Indices of learnt samples. */
  learnt: number[];
}

/**
 * Runs a score-only engine with a {@link ScoreHost} over `length` samples of
 * the world `worldAt(t)`; the host retrains when told and learns (absorbing a
 * share `absorbRate` per learnt sample of the present degradation) what the
 * engine says to learn. `acknowledgeAfter` acknowledges every alarm that many
 * samples later; `confirmAfter` confirms every retrain the engine asks for
 * (`"await-confirmation"`) that many samples later.
 */
export function runHost(
  engine: DecisionEngine,
  host: ScoreHost,
  worldAt: (t: number) => World,
  length: number,
  options: { absorbRate?: number; acknowledgeAfter?: number; confirmAfter?: number; onDecision?: (d: Decision, t: number) => void } = {},
): HostRun {
  const run: HostRun = { decisions: [], retrains: [], switches: [], alarms: [], learnt: [] };
  const absorbRate = options.absorbRate ?? 0.001;
  let ackAt = -1;
  let confirmAt = -1;
  for (let t = 0; t < length; t++) {
    const world = worldAt(t);
    const { live, references } = host.score(world);
    const d = engine.observeScores(live, references);
    run.decisions.push(d);
    if (d.action === "learn") {
      run.learnt.push(t);
      host.absorbed += Math.max(0, Math.min(absorbRate, world.degradation - host.absorbed));
    }
    if (d.action === "retrain") {
      run.retrains.push(t);
      host.retrain(world);
      engine.modelReplaced();
    }
    if (d.action === "switch-mode") {
      run.switches.push(t);
      const to = d.evidence.switchedTo as number;
      host.liveMode = to === 0 ? (host.models[0] as number) : (host.models[host.models.length - 1] as number);
    }
    if (d.action === "alarm") {
      run.alarms.push(d);
      if (options.acknowledgeAfter !== undefined) ackAt = t + options.acknowledgeAfter;
    }
    if (t === ackAt) engine.acknowledge();
    if (d.action === "await-confirmation" && options.confirmAfter !== undefined) confirmAt = t + options.confirmAfter;
    if (t === confirmAt && engine.awaitingConfirmation) engine.confirmRetrain();
    options.onDecision?.(d, t);
  }
  return run;
}

/** A world with nothing happening. */
export const calm = (): World => ({ mode: 0, degradation: 0, fault: 0 });

/** Small, fast engine settings for score-only tests (the defaults scaled down about tenfold). */
export const QUICK = {
  commissioning: 200,
  calibration: 400,
  settling: 100,
  settlingLimit: 1200,
  trendBlock: 30,
  trendWindow: 100,
  trendMinRise: 0.75,
  coolDown: 300,
  targetArl0: 5000,
  baselineHalfLife: 600,
} as const;
