import { envelope, openSnapshot, type Snapshot } from "@leeway/core";
import type { ScoreLevel } from "./calibration.js";

/** The plain state of an {@link AnomalyEpisode}. */
export interface AnomalyEpisodeState {
  enter: number | null;
  exit: number | null;
  anomalous: boolean;
  run: number;
  normalRun: number;
  /** σ of the live level the thresholds were set from, or null before calibration. */
  spread: number | null;
  excess: number;
}

/**
 * The anomaly rule: an episode begins when the live log score
 * u = ln(s + floor) passes the entry threshold (a high quantile of the
 * calibration scores plus a margin, in σ of the live level), lasts while it
 * stays above the lower exit threshold (hysteresis in level), and ends only
 * after `needed` consecutive samples below it (hysteresis in time). Every
 * sample of an episode is held; `needed` samples above raise the alarm, and
 * so does an episode whose samples together lie far enough above the entry
 * threshold: Σ (u − u_enter)/σ over the samples above it reaches `excess`
 * (a strong fault shorter than the run is still reported; the run guards
 * against weak ones, the sum against short strong ones).
 * @example
 * const e = new AnomalyEpisode();
 * e.calibrate(0, { mean: 0, spread: 1 }, 1, 0); // enter at u > 1, leave at u ≤ 0
 * [e.observe(2, 3), e.observe(0.5, 3), e.run]; // [true, true, 1]
 */
export class AnomalyEpisode {
  static readonly kind = "leeway.policy.anomaly-episode";
  static readonly version = 2;
  #enter: number | null = null; // on u_live
  #exit: number | null = null;
  #anomalous = false;
  #run = 0; // samples above the exit threshold in the present episode
  #normalRun = 0; // consecutive samples below it since the last one above
  #above = false;
  #spread: number | null = null;
  #excess = 0; // Σ (u − enter)/σ over the samples above the entry threshold in the present episode

  /** Sets the thresholds from the calibration's live-score quantile q (log scale) and level: q + margin·σ. */
  calibrate(quantile: number, live: ScoreLevel, enterMargin: number, exitMargin: number): void {
    this.#enter = quantile + enterMargin * live.spread;
    this.#exit = quantile + exitMargin * live.spread;
    this.#spread = live.spread;
    this.clear();
  }

  /** Forgets the thresholds (a new commissioning). */
  forget(): void {
    this.#enter = null;
    this.#exit = null;
    this.#spread = null;
    this.clear();
  }

  /** Ends any episode. */
  clear(): void {
    this.#anomalous = false;
    this.#run = 0;
    this.#normalRun = 0;
    this.#excess = 0;
  }

  /** True when the thresholds are set. */
  get calibrated(): boolean {
    return this.#enter !== null;
  }
  /** True while an episode lasts. */
  get anomalous(): boolean {
    return this.#anomalous;
  }
  /** Samples above the exit threshold in the present episode. */
  get run(): number {
    return this.#run;
  }
  /** Σ (u − u_enter)/σ over the present episode's samples above the entry threshold. */
  get excess(): number {
    return this.#excess;
  }
  /** True when the episode raises the alarm: `needed` samples above, or an excess of at least `excess` σ (0: only the run). */
  due(needed: number, excess: number): boolean {
    return this.#run >= needed || (excess > 0 && this.#excess >= excess);
  }
  /** Whether the last observed sample was above its threshold. */
  get above(): boolean {
    return this.#above;
  }

  /** The entry threshold in score units (exp(u) − floor), or null before calibration. */
  threshold(floor: number): number | null {
    return this.#enter === null ? null : Math.exp(this.#enter) - floor;
  }

  /**
   * The exit threshold as a normalised score, in σ: (u_exit − μ_live)/σ_live,
   * at most `clip`; a settled level at or above it is an anomaly that persists.
   */
  exitLevel(live: ScoreLevel | null, clip: number): number {
    if (live === null || this.#exit === null) return Infinity;
    return Math.min(clip, (this.#exit - live.mean) / live.spread);
  }

  /** Judges one live log score; returns true while the sample belongs to an episode (hold it). */
  observe(uLive: number, needed: number): boolean {
    const above = this.#anomalous ? uLive > (this.#exit as number) : uLive > (this.#enter as number);
    this.#above = above;
    if (above || (this.#anomalous && this.#normalRun + 1 < needed)) {
      if (above) {
        this.#run += 1;
        this.#normalRun = 0;
        const over = (uLive - (this.#enter as number)) / (this.#spread as number);
        if (over > 0) this.#excess += over;
      } else this.#normalRun += 1;
      this.#anomalous = true;
      return true;
    }
    this.clear();
    return false;
  }

  /** Counts one outlier judged by another rule (while settling) as a sample above. */
  countOutlier(): void {
    this.#anomalous = true;
    this.#run += 1;
  }

  snapshot(): Snapshot<AnomalyEpisodeState> {
    return envelope(AnomalyEpisode.kind, AnomalyEpisode.version, {
      enter: this.#enter,
      exit: this.#exit,
      anomalous: this.#anomalous,
      run: this.#run,
      normalRun: this.#normalRun,
      spread: this.#spread,
      excess: this.#excess,
    });
  }

  /** Rebuilds an episode; `needed` is the engine's anomalyRun. */
  static restore(snapshot: unknown, needed: number): AnomalyEpisode {
    const r = openSnapshot(snapshot, AnomalyEpisode.kind, AnomalyEpisode.version);
    const enter = r.numberOrNull("enter");
    const exit = r.numberOrNull("exit");
    if ((enter === null) !== (exit === null)) r.fail("exit", "must be set exactly when enter is set");
    if (enter !== null && exit !== null && exit > enter) r.fail("exit", `must be at most enter (${enter}), got ${exit}`);
    const anomalous = r.boolean("anomalous");
    const run = r.integer("run", 0, Number.MAX_SAFE_INTEGER);
    const normalRun = r.integer("normalRun", 0, needed);
    const spread = r.numberOrNull("spread");
    if ((spread === null) !== (enter === null)) r.fail("spread", "must be set exactly when enter is set");
    if (spread !== null && !(spread > 0 && spread < 1e100)) r.fail("spread", `must be in (0, 1e100), got ${spread}`);
    const excess = r.numberIn("excess", 0, 1e300);
    if (excess > 0 && run === 0) r.fail("excess", `must be 0 when run is 0, got ${excess}`);
    const e = new AnomalyEpisode();
    e.#enter = enter;
    e.#exit = exit;
    e.#anomalous = anomalous;
    e.#run = run;
    e.#normalRun = normalRun;
    e.#spread = spread;
    e.#excess = excess;
    return e;
  }
}
