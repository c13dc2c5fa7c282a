import { SEN_INTERVAL_MAX_N } from "@leeway/stats";
import type { ScoreLevel } from "./calibration.js";
import { limitEvidence, type LimitEvidence } from "./limit-evidence.js";

/** The settings the time-to-limit evidence reads (a subset of the engine's). */
export interface LimitSettings {
  /** The user's limit, a score level of the active reference (score units); 0: none. */
  limit: number;
  trendBlock: number;
  scoreFloor: number;
  scoreClip: number;
  /** Seconds between samples when the engine was given `samplePeriod`, else null (times stay in samples). */
  samplePeriod: number | null;
}

/** The times of an estimate in seconds from the current sample (with `samplePeriod` only). */
export interface LimitSeconds {
  expected: number;
  earliest: number;
  latest: number;
}

/**
 * What a degradation decision says about the limit: {@link limitEvidence}
 * computed from the trend window at its latest block, its times counted from
 * the current sample, and, when the engine knows its sample period, the same
 * times in seconds (`seconds`, null otherwise or without an estimate).
 */
export type LimitDecisionEvidence = LimitEvidence & { seconds: LimitSeconds | null };

/**
 * The time to the user's limit for the degradation rule's reference trend,
 * computed once per complete trend block and kept ({@link limitEvidence}
 * costs O(w²) for the Theil-Sen line and Sen's interval); between blocks only
 * the count from the latest block to the current sample moves. The kept
 * answer is no state of its own: after a restore it is computed again from
 * the same window, so a restored engine reports the same bits.
 * @example
 * const w = new LimitWatch({ limit: Math.exp(3), trendBlock: 60, scoreFloor: 1e-12, scoreClip: 6, samplePeriod: 10 });
 * const means = Float64Array.from({ length: 40 }, (_, i) => 0.05 * i + 0.02 * Math.sin(7 * i));
 * const e = w.evidence(means, 2399, 2399, { mean: 0, spread: 1 });
 * e.status === "estimated" ? [Math.round(e.expected), Math.round(e.seconds?.expected ?? 0)] : e.status; // [1228, 12278]
 */
export class LimitWatch {
  readonly #s: LimitSettings;
  #kept: LimitEvidence | null = null;
  #keptAt = -1; // the sample index of the block end the kept answer was computed at
  #keptLevel: ScoreLevel | null = null;

  constructor(settings: LimitSettings) {
    this.#s = settings;
  }

  /** True when the engine has a limit to estimate. */
  get active(): boolean {
    return this.#s.limit > 0;
  }

  /** Forgets the kept answer (the trend window restarted). */
  forget(): void {
    this.#kept = null;
    this.#keptAt = -1;
    this.#keptLevel = null;
  }

  /**
   * The evidence at sample `index` from the trend window `means` (block means
   * of the normalised score, oldest first; the newest {@link SEN_INTERVAL_MAX_N}
   * are used) whose latest block ended at sample `blockEnd`, under the
   * reference's calibrated `level`.
   */
  evidence(means: Float64Array, blockEnd: number, index: number, level: ScoreLevel): LimitDecisionEvidence {
    const s = this.#s;
    if (this.#kept === null || this.#keptAt !== blockEnd || this.#keptLevel !== level) {
      const window = means.length > SEN_INTERVAL_MAX_N ? means.subarray(means.length - SEN_INTERVAL_MAX_N) : means;
      this.#kept = limitEvidence({ means: window, blockLength: s.trendBlock, index: Math.max(0, blockEnd), limit: s.limit, level, scoreFloor: s.scoreFloor, scoreClip: s.scoreClip });
      this.#keptAt = blockEnd;
      this.#keptLevel = level;
    }
    const kept = this.#kept;
    if (kept.status !== "estimated") return { ...kept, seconds: null };
    // the kept times count from the block's end; the current sample is `elapsed` later
    const elapsed = index - blockEnd;
    const expected = Math.max(0, kept.expected - elapsed);
    const earliest = Math.max(0, kept.earliest - elapsed);
    const latest = Math.max(0, kept.latest - elapsed);
    const period = s.samplePeriod;
    const seconds = period === null ? null : { expected: expected * period, earliest: earliest * period, latest: latest * period };
    return { ...kept, expected, earliest, latest, seconds };
  }
}
