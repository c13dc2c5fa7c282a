import { AutoencoderPool, type FrozenModel } from "@leeway/pool";
import type { Action, Cause, Decision, Phase } from "@leeway/policy";

/** Options of a {@link NaivePolicy}. */
export interface NaivePolicyOptions {
  /** "frozen": never learn after commissioning; "adapt": learn every sample with forgetting, no gate. */
  kind: "frozen" | "adapt";
  /** Length of a feature vector. */
  inputs: number;
  /** Hidden units of the autoencoder. */
  hidden: number;
  /** Samples learnt before the model is frozen (frozen) or before scoring starts (adapt). */
  commissioning: number;
  /** Samples after commissioning whose scores calibrate the threshold. */
  calibration: number;
  /** Consecutive samples above the threshold that raise an alarm. */
  run: number;
  /** Forgetting factor of the adapting model (memory ≈ 1/(1 − λ) samples). */
  forgetting: number;
  seed: string;
}

/**
 * A naive baseline for the decision-quality suite, in the engine's decision
 * vocabulary so that the same metrics apply:
 * - **frozen only**: an OS-ELM autoencoder learns the commissioning window and
 *   is frozen; nothing is learnt afterwards;
 * - **always adapt**: the same autoencoder keeps learning every sample with
 *   forgetting factor λ and no gate.
 * Both calibrate one threshold on the log scores of the `calibration` samples
 * after commissioning (their 0.99 quantile plus one standard deviation, as
 * the engine's anomaly threshold starts), raise an alarm (cause `"anomaly"`:
 * they know no other) when `run` consecutive scores exceed it, and are ready
 * to alarm again once a score falls below it. Nobody needs to acknowledge.
 * @example
 * const p = new NaivePolicy({ kind: "frozen", inputs: 4, hidden: 2, commissioning: 20, calibration: 20, run: 5, forgetting: 1, seed: "1" });
 * p.observe(Float64Array.of(1, 2, 3, 4)).phase; // "commissioning"
 */
export class NaivePolicy {
  readonly #o: NaivePolicyOptions;
  readonly #pool: AutoencoderPool;
  #frozen: FrozenModel | null = null;
  #index = -1;
  readonly #calibration: number[] = [];
  #threshold = Infinity;
  #run = 0;
  #armed = true;

  constructor(options: NaivePolicyOptions) {
    this.#o = options;
    this.#pool = new AutoencoderPool({ inputs: options.inputs, hidden: options.hidden, maxMembers: 1, seed: `${options.seed}/pool`, forgetting: options.kind === "adapt" ? options.forgetting : 1 });
  }

  /** Scores one sample, learns it if the policy learns, and decides. */
  observe(x: Float64Array): Decision {
    const i = ++this.#index;
    const o = this.#o;
    if (i < o.commissioning) {
      this.#pool.learn(x);
      if (o.kind === "frozen" && i === o.commissioning - 1) this.#frozen = this.#pool.freeze(0);
      return decision(i, "learn", "commissioning", "commissioning", Number.NaN);
    }
    const score = this.#frozen !== null ? this.#frozen.score(x) : this.#pool.score(x).loss;
    const learns = o.kind === "adapt";
    if (learns) this.#pool.learn(x, 0);
    const u = Math.log(score + 1e-12);
    if (i < o.commissioning + o.calibration) {
      this.#calibration.push(u);
      if (i === o.commissioning + o.calibration - 1) this.#threshold = thresholdOf(this.#calibration);
      return decision(i, learns ? "learn" : "hold", "commissioning", "commissioning", score);
    }
    const above = u > this.#threshold;
    this.#run = above ? this.#run + 1 : 0;
    if (!above) this.#armed = true;
    if (this.#armed && this.#run >= o.run) {
      this.#armed = false;
      return decision(i, "alarm", "anomaly", "watching", score);
    }
    return decision(i, learns ? "learn" : "hold", above ? "anomaly" : "normal", "watching", score);
  }
}

function decision(index: number, action: Action, cause: Cause, phase: Phase, score: number): Decision {
  return { index, action, cause, phase, evidence: { liveScore: score, referenceScores: [score] } };
}

/** The 0.99 quantile (linear interpolation) of the log scores plus one standard deviation. */
function thresholdOf(us: readonly number[]): number {
  const sorted = [...us].sort((a, b) => a - b);
  const h = (sorted.length - 1) * 0.99;
  const lo = Math.floor(h);
  const q = (sorted[lo] as number) + (h - lo) * ((sorted[Math.min(sorted.length - 1, lo + 1)] as number) - (sorted[lo] as number));
  const mean = us.reduce((a, b) => a + b, 0) / us.length;
  const sd = Math.sqrt(us.reduce((a, b) => a + (b - mean) ** 2, 0) / Math.max(1, us.length - 1));
  return q + sd;
}
