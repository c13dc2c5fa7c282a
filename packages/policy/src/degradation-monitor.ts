import { envelope, openSnapshot, type Snapshot } from "@leeway/core";
import { BlockTrend, type TrendEvidence } from "./block-trend.js";
import type { ScoreLevel } from "./calibration.js";
import { LimitWatch, type LimitDecisionEvidence, type LimitSettings } from "./limit-watch.js";

/** The settings the degradation rule reads (a subset of the engine's). */
export interface DegradationSettings extends LimitSettings {
  trendBlock: number;
  trendWindow: number;
  trendZ: number;
  trendWarnZ: number;
  trendClearZ: number;
  trendMinRise: number;
  trendMinBlocks: number;
  confirmShift: number;
}

/** How strong the degradation evidence is: none, a warning (stop learning, refuse retrains), an alarm. */
export type DegradationStrength = 0 | 1 | 2;

/** The plain state of a {@link DegradationMonitor}. */
export interface DegradationMonitorState {
  referenceTrend: Snapshot;
  gapTrend: Snapshot;
  standing: boolean;
  alarmed: boolean;
  episodeAlarmed: boolean;
  warningSince: number;
  lastBlockAt: number;
}

/**
 * The degradation rule: block means of the active reference's normalised
 * score z, and of the gap z_reference − z_live (the rise the live model has
 * absorbed), go through long decimated Mann-Kendall windows with Theil-Sen
 * slopes ({@link BlockTrend}). A significant rise is a warning (learning
 * stops, retraining is refused) or an alarm. Evidence stands at least one
 * whole window (nothing learnt meanwhile) and clears only when both trends
 * have fallen below the clearing z and the level is back near normal. An alarm's refusal
 * of retrains lasts until the next commissioning (wear does not heal).
 *
 * With a `limit` it also tells how long the reference's score has until it
 * reaches that level at the current rate ({@link LimitWatch}).
 * @example
 * const m = new DegradationMonitor({ trendBlock: 10, trendWindow: 50, trendZ: 3.09, trendWarnZ: 2.33, trendClearZ: 1.64, trendMinRise: 0.5, trendMinBlocks: 20, confirmShift: 1, limit: 0, scoreFloor: 1e-12, scoreClip: 6, samplePeriod: null });
 * for (let i = 0; i < 500; i++) m.observe(i * 0.01, 0, i);
 * m.strength(); // 2
 */
export class DegradationMonitor {
  static readonly kind = "leeway.policy.degradation-monitor";
  static readonly version = 2;
  readonly #s: DegradationSettings;
  #referenceTrend: BlockTrend;
  #gapTrend: BlockTrend;
  #standing = false; // evidence stands: learning stopped, retraining refused
  #alarmed = false; // a lasting degradation alarm was raised since the last commissioning
  #episodeAlarmed = false; // the present evidence has raised its alarm
  #warningSince = 0; // index at which the present warning began
  #lastBlockAt = -1; // index of the sample that completed the latest trend block, −1 before one
  readonly #limit: LimitWatch;

  constructor(settings: DegradationSettings) {
    this.#s = settings;
    this.#referenceTrend = new BlockTrend(settings.trendBlock, settings.trendWindow);
    this.#gapTrend = new BlockTrend(settings.trendBlock, settings.trendWindow);
    this.#limit = new LimitWatch(settings);
  }

  /** True while evidence stands (learning stopped, retraining refused). */
  get standing(): boolean {
    return this.#standing;
  }
  /** True when a lasting degradation alarm was raised since the last commissioning. */
  get alarmed(): boolean {
    return this.#alarmed;
  }
  /** True when the present evidence has raised its alarm. */
  get episodeAlarmed(): boolean {
    return this.#episodeAlarmed;
  }

  /** Adds sample `index`'s normalised active-reference and live scores. */
  observe(zActive: number, zLive: number, index: number): void {
    if (this.#referenceTrend.observe(zActive)) this.#lastBlockAt = index;
    this.#gapTrend.observe(zActive - zLive);
  }

  /**
   * The time to the user's limit at sample `index` under the active
   * reference's `level`, or null without a limit (or before a block).
   */
  limitEvidence(index: number, level: ScoreLevel): LimitDecisionEvidence | null {
    if (!this.#limit.active || this.#lastBlockAt < 0) return null;
    return this.#limit.evidence(this.#referenceTrend.means, this.#lastBlockAt, index, level);
  }

  /** The trend evidence of a decision: the reference's trend, and the gap with its present value. */
  evidence(zActive: number, zLive: number): { trend: TrendEvidence; gap: TrendEvidence & { value: number } } {
    return { trend: this.#referenceTrend.evidence, gap: { value: zActive - zLive, ...this.#gapTrend.evidence } };
  }

  /**
   * 0: no evidence; 1: a warning; 2: an alarm. The reference's own trend
   * counts at its strength: z past the level and a Theil-Sen rise past
   * `trendMinRise` (half of it for a warning). The gap can lend its rise to an
   * alarm only when the reference's own z is at alarm strength: a live model
   * that keeps improving on normal data widens the gap too, and that is no fault.
   */
  strength(): DegradationStrength {
    const s = this.#s;
    const ref = this.#referenceTrend;
    if (ref.blocks < s.trendMinBlocks || ref.z < s.trendWarnZ) return 0;
    const refRise = ref.rise; // the Theil-Sen slope, O(w²), only for a trend this strong
    if (refRise < s.trendMinRise / 2) return 0;
    if (ref.z >= s.trendZ && refRise >= s.trendMinRise) return 2;
    const gap = this.#gapTrend;
    if (ref.z >= s.trendZ && gap.blocks >= s.trendMinBlocks && gap.z >= s.trendZ && gap.rise >= s.trendMinRise) return 2;
    return 1;
  }

  /**
   * Carries a sample's evidence of strength 0 or 1 (an alarm is raised by the
   * engine, then {@link DegradationMonitor.alarm}) forward at sample `index`:
   * a warning begins or stands; one that has neither grown nor cleared over a
   * whole window expires; standing evidence clears when the trends fall back.
   */
  carry(strength: DegradationStrength, index: number): void {
    if (strength >= 1 && !this.#standing) this.#warningSince = index;
    const span = this.#s.trendWindow * this.#s.trendBlock;
    if (strength >= 1) this.#standing = true;
    else if (this.#standing && index - this.#warningSince >= span && this.#cleared()) {
      // Learning may resume; an alarm raised by this evidence keeps refusing retrains through `alarmed`.
      this.#standing = false;
      this.#episodeAlarmed = false;
    }
  }

  /** Neither trend significant any more and the latest block mean back within `confirmShift` σ of normal. */
  #cleared(): boolean {
    const s = this.#s;
    return this.#referenceTrend.z < s.trendClearZ && this.#gapTrend.z < s.trendClearZ && this.#referenceTrend.lastMean < s.confirmShift;
  }

  /** A degradation alarm was raised; `lasting` alarms refuse retrains until the next commissioning. */
  alarm(lasting: boolean): void {
    this.#standing = true;
    this.#episodeAlarmed = true;
    if (lasting) this.#alarmed = true;
  }

  /** The operator acknowledged a degradation alarm: the evidence keeps standing. */
  keepStanding(): void {
    this.#standing = true;
  }

  /** Forgets the trend windows (a new reference, a new mode, an accepted level). */
  restartTrends(): void {
    this.#referenceTrend.restart();
    this.#gapTrend.restart();
    this.#lastBlockAt = -1;
    this.#limit.forget();
  }

  /** A new reference level: trends restart, and a warning measured against the old one does not carry over (an alarm's refusal does). */
  newLevel(): void {
    this.restartTrends();
    this.#standing = false;
    this.#episodeAlarmed = false;
  }

  /** A new commissioning: everything is forgotten. */
  recommission(): void {
    this.newLevel();
    this.#alarmed = false;
  }

  snapshot(): Snapshot<DegradationMonitorState> {
    return envelope(DegradationMonitor.kind, DegradationMonitor.version, {
      referenceTrend: this.#referenceTrend.snapshot(),
      gapTrend: this.#gapTrend.snapshot(),
      standing: this.#standing,
      alarmed: this.#alarmed,
      episodeAlarmed: this.#episodeAlarmed,
      warningSince: this.#warningSince,
      lastBlockAt: this.#lastBlockAt,
    });
  }

  static restore(snapshot: unknown, settings: DegradationSettings): DegradationMonitor {
    const r = openSnapshot(snapshot, DegradationMonitor.kind, DegradationMonitor.version);
    const referenceTrend = BlockTrend.restore(r.raw("referenceTrend"), settings.trendBlock, settings.trendWindow);
    const gapTrend = BlockTrend.restore(r.raw("gapTrend"), settings.trendBlock, settings.trendWindow);
    const standing = r.boolean("standing");
    const alarmed = r.boolean("alarmed");
    const episodeAlarmed = r.boolean("episodeAlarmed");
    if (episodeAlarmed && !standing) r.fail("episodeAlarmed", "can be true only while evidence stands");
    const warningSince = r.integer("warningSince", 0, Number.MAX_SAFE_INTEGER);
    const lastBlockAt = r.integer("lastBlockAt", -1, Number.MAX_SAFE_INTEGER);
    if ((lastBlockAt < 0) !== (referenceTrend.blocks === 0)) r.fail("lastBlockAt", `must be −1 exactly while the trend holds no block, got ${lastBlockAt} with ${referenceTrend.blocks} blocks`);
    const m = new DegradationMonitor(settings);
    m.#referenceTrend = referenceTrend;
    m.#gapTrend = gapTrend;
    m.#standing = standing;
    m.#alarmed = alarmed;
    m.#episodeAlarmed = episodeAlarmed;
    m.#warningSince = warningSince;
    m.#lastBlockAt = lastBlockAt;
    return m;
  }
}
