import { AutoencoderPool, type FrozenModel } from "@leeway/pool";
import { DecisionEngine, type Decision } from "@leeway/policy";
import { collect, type CollectedStream, type Scenario } from "@leeway/sim";

/** Scenario streams are simulated once per test file (the simulator costs about 0.1 ms per spectrum). */
const cache = new Map<string, CollectedStream>();
export function stream(name: string, make: () => Scenario): CollectedStream {
  let s = cache.get(name);
  if (s === undefined) {
    s = collect(make());
    cache.set(name, s);
  }
  return s;
}

/** Suite length: long enough for commissioning (1200), a settling of 900 after a drift at L/2 and the preset's fault of 0.025·L = 300 samples. */
export const SUITE_LENGTH = 12_000;

/**
 * The engine's feature-mode options in these tests: the defaults, with a
 * 256-8-256 pool of 3 members instead of 256-32-256 × 4 (a quarter of the
 * cost; the decisions do not depend on the network's size here).
 */
export const FEATURE_OPTIONS = { inputs: 256, hidden: 8, members: 3, seed: 1 } as const;

/**
 * The operator in these tests: acknowledges every alarm 30 samples (half a
 * minute) after it is raised, and answers every question the engine asks
 * ("await-confirmation") 30 samples later by confirming the retrain: none of
 * the suite's scenarios has a fault that outlasts the settling window, so
 * every level that persists is a new normal.
 */
export const ACKNOWLEDGE_AFTER = 30;

/** What a policy did over a stream. */
export interface PolicyRun {
  alarms: number[];
  retrains: number[];
  switches: number[];
  learnt: number[];
  decisions: Decision[];
}

/** Any policy fed one spectrum at a time, with an operator that acknowledges alarms. */
export interface Policy {
  observe(x: Float64Array): { action: string };
  acknowledge(): void;
  confirmRetrain?(): void;
}

/** Runs a policy over spectra with the test operator. */
export function runPolicy(policy: Policy, spectra: readonly Float64Array[]): PolicyRun {
  const run: PolicyRun = { alarms: [], retrains: [], switches: [], learnt: [], decisions: [] };
  let ackAt = -1;
  let confirmAt = -1;
  spectra.forEach((x, i) => {
    const d = policy.observe(x);
    if ("index" in d) run.decisions.push(d as Decision);
    if (d.action === "alarm") {
      run.alarms.push(i);
      ackAt = i + ACKNOWLEDGE_AFTER;
    }
    if (d.action === "retrain") run.retrains.push(i);
    if (d.action === "switch-mode") run.switches.push(i);
    if (d.action === "learn") run.learnt.push(i);
    if (i === ackAt) policy.acknowledge();
    if (d.action === "await-confirmation") confirmAt = i + ACKNOWLEDGE_AFTER;
    if (i === confirmAt) policy.confirmRetrain?.();
  });
  return run;
}

/** The engine as a {@link Policy}. */
export function enginePolicy(options: Record<string, unknown> = {}): DecisionEngine {
  return new DecisionEngine({ ...FEATURE_OPTIONS, ...options });
}

/**
 * Baselines built from the same parts as the engine: an autoencoder pool
 * learns the commissioning window (600 samples), the anomaly threshold is
 * calibrated the same way (log scale: 0.99 quantile of the next 600 scores
 * plus one σ), and a run of 5 scores above it raises an alarm that stays until
 * acknowledged (and is raised again while scores stay high).
 * - "frozen only": the commissioning model is frozen and scores everything; nothing adapts.
 * - "always adapt": the model keeps learning every sample with forgetting
 *   (λ = 0.999, a memory of about 1000 samples), no gating.
 */
export class BaselinePolicy implements Policy {
  readonly #adapt: boolean;
  readonly #pool: AutoencoderPool;
  #frozen: FrozenModel | null = null;
  #index = -1;
  readonly #calibration: number[] = [];
  #threshold = Infinity;
  #run = 0;
  #latched = false;

  constructor(kind: "frozen only" | "always adapt") {
    this.#adapt = kind === "always adapt";
    this.#pool = new AutoencoderPool({ inputs: 256, hidden: FEATURE_OPTIONS.hidden, maxMembers: 1, seed: "1/pool", forgetting: this.#adapt ? 0.999 : 1 });
  }

  observe(x: Float64Array): { action: string } {
    this.#index += 1;
    const i = this.#index;
    if (i < 600) {
      this.#pool.learn(x);
      if (i === 599) this.#frozen = this.#pool.freeze(0);
      return { action: "learn" };
    }
    const score = this.#adapt ? this.#pool.score(x).loss : (this.#frozen as FrozenModel).score(x);
    if (this.#adapt) this.#pool.learn(x, 0);
    if (i < 1200) {
      this.#calibration.push(Math.log(score));
      if (i === 1199) this.#threshold = thresholdOf(this.#calibration);
      return { action: "learn" };
    }
    this.#run = Math.log(score) > this.#threshold ? this.#run + 1 : 0;
    if (!this.#latched && this.#run >= 5) {
      this.#latched = true;
      return { action: "alarm" };
    }
    return { action: this.#adapt ? "learn" : "hold" };
  }

  acknowledge(): void {
    this.#latched = false;
    this.#run = 0;
  }
}

function thresholdOf(us: number[]): number {
  const sorted = [...us].sort((a, b) => a - b);
  const h = (sorted.length - 1) * 0.99;
  const lo = Math.floor(h);
  const q = (sorted[lo] as number) + (h - lo) * ((sorted[Math.min(sorted.length - 1, lo + 1)] as number) - (sorted[lo] as number));
  const mean = us.reduce((a, b) => a + b, 0) / us.length;
  const sd = Math.sqrt(us.reduce((a, b) => a + (b - mean) ** 2, 0) / (us.length - 1));
  return q + sd;
}

/** Alarms inside [start, end). */
export const alarmsIn = (run: PolicyRun, start: number, end: number): number[] => run.alarms.filter((a) => a >= start && a < end);
