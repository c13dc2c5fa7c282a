import { envelope, openSnapshot, StateError, toPlainArray, type Snapshot, type SnapshotReader } from "@leeway/core";
import type { ChangeTest } from "@leeway/change";
import type { Action, Cause, Decision, Evidence, Phase } from "./decision.js";
import { CAUSES, PHASES } from "./decision.js";
import { CORE_OPTION_NAMES, resolveCoreSettings, type CoreSettings } from "./options.js";
import { levelOf, normalised, quantileOf, type ScoreLevel } from "./calibration.js";
import { calibratedThreshold, gaussianThreshold, makeChangeTest, restoreTest } from "./change-factory.js";
import { BlockTrend } from "./block-trend.js";
import { SettlingWindow, type SettlingCheck } from "./settling-window.js";

/** Samples a settling window needs before its own level judges anomalies. */
const SETTLING_WARM_UP = 20;
/** The smallest window spread used in that judgement, in σ. */
const MIN_WINDOW_SPREAD = 0.05;

/** What a calibration span is for. */
type CalibrationPurpose = "commissioning" | "recalibration";

/** The plain state of a {@link DecisionCore}. */
export interface DecisionCoreState {
  settings: Record<string, unknown>;
  index: number;
  skipped: number;
  phase: Phase;
  latchCause: Cause | null;
  commissioningLength: number;
  commissioningLeft: number;
  calibrationPurpose: CalibrationPurpose | null;
  calibrationFilled: number;
  calibrationLive: number[];
  calibrationActive: number[];
  levels: { mean: number; spread: number }[];
  liveLevel: { mean: number; spread: number } | null;
  anomalyEnter: number | null;
  anomalyExit: number | null;
  changeThreshold: number | null;
  changeTest: Snapshot | null;
  baseline: number;
  activeId: number;
  newestId: number;
  anomalous: boolean;
  anomalyRun: number;
  normalRun: number;
  referenceTrend: Snapshot;
  gapTrend: Snapshot;
  degradationStanding: boolean;
  degradationAlarmed: boolean;
  episodeAlarmed: boolean;
  warningSince: number;
  settlingWindow: Snapshot;
  settlingStart: number;
  risingRun: number;
  pending: boolean;
  confirmed: boolean;
  anomalySettling: boolean;
  anomalyAlarmAt: number;
  askAfter: number;
  retrainLog: number[];
  coolDownUntil: number;
  retrains: number;
  switches: number;
  alarms: number;
}

/**
 * The decision core that both feeding modes share: it sees, per sample, the
 * live model's score and the scores under the frozen references, and decides.
 *
 * Method (one sample): scores go to the log scale and are normalised by the
 * levels measured while calibrating each model, z = (ln(s + floor) − μ)/σ.
 * 1. Anomaly: the live log score above the calibrated entry threshold
 *    (a high calibration quantile plus a margin; left below a lower exit
 *    threshold, hysteresis) → hold; a run of them → alarm "anomaly".
 * 2. Degradation: block means of the active reference's z, and of the gap
 *    z_reference − z_live, go through long Mann-Kendall windows; a significant
 *    rise (z, and a Theil-Sen rise of at least `trendMinRise` σ) → alarm
 *    "degradation"; a weaker one stops learning and forbids retraining.
 * 3. Concept drift: a change test (two-sided CUSUM by default, calibrated to a
 *    target in-control ARL by block bootstrap) on the active reference's z
 *    fires → settling: nothing learnt until the post-change window is
 *    stationary (no Mann-Kendall trend, equal half means). Then: a shift below
 *    `confirmShift` σ was a false alarm; a reference that scores the window as
 *    normal is a known mode (switch-mode); otherwise retrain (auto, confirm or
 *    never), within a budget per horizon and a cool-down.
 * 4. After an acknowledged anomaly alarm the engine settles too; a settled
 *    level still at or above the anomaly exit threshold is an anomaly that
 *    persists, and it waits for the operator ("await-confirmation", cause
 *    "anomaly") whatever the retrain mode, unless `persistentAnomaly` is
 *    "as-drift". Anomalies are never learnt without an operator's word.
 *
 * The core owns no model: the engine feeds it scores and carries out
 * "learn", "retrain" and "switch-mode" (feature mode), or the host does
 * (score-only mode, answering a retrain with {@link DecisionCore.modelReplaced}).
 */
export class DecisionCore {
  static readonly kind = "leeway.policy.decision-core";
  static readonly version = 2;
  readonly settings: CoreSettings;
  readonly #component: string;
  #index = -1;
  #skipped = 0;
  #phase: Phase = "commissioning";
  #latchCause: Cause | null = null;
  #commissioningLength: number;
  #commissioningLeft: number;
  #calibrationPurpose: CalibrationPurpose | null = null;
  #calibrationFilled = 0;
  readonly #calibrationLive: Float64Array;
  readonly #calibrationActive: Float64Array;
  #levels: ScoreLevel[] = [];
  #liveLevel: ScoreLevel | null = null;
  #anomalyEnter: number | null = null; // on u_live = ln(live + floor)
  #anomalyExit: number | null = null;
  #changeThreshold: number | null = null;
  #changeTest: ChangeTest | null = null;
  #baseline = 0; // b: slowly following in-control level of the active z, in σ
  readonly #baselineAlpha: number; // α = 1 − 2^(−1/halfLife)
  #activeId = 0;
  #newestId = 0;
  #anomalous = false;
  #anomalyRun = 0; // samples above the exit threshold in the present anomaly episode
  #normalRun = 0; // consecutive samples below it since the last one above
  #referenceTrend: BlockTrend;
  #gapTrend: BlockTrend;
  #degradationStanding = false;
  #degradationAlarmed = false; // a degradation alarm was raised since the last commissioning
  #episodeAlarmed = false; // the present degradation evidence has raised its alarm
  #warningSince = 0; // index at which the present degradation warning began
  #settlingWindow: SettlingWindow;
  #settlingStart = -1;
  #risingRun = 0; // consecutive settling checks with a rising trend
  #pending = false;
  #confirmed = false;
  #anomalySettling = false; // settling after an acknowledged anomaly alarm: a level that persists needs the operator
  #anomalyAlarmAt = -1; // index of the last anomaly alarm
  #askAfter = 0; // after a rejected persistent anomaly: no new question before this index
  #retrainLog: number[] = [];
  #coolDownUntil = 0;
  #retrains = 0;
  #switches = 0;
  #alarms = 0;
  /** Set by a commissioning step that ended the learning part: freeze the live model as the commissioning reference now. */
  freezeNow = false;
  /** Ring position of the settling window this sample took (the engine keeps its row there), or −1. */
  keptAt = -1;
  /** The reference a switch-mode decision switched to, or −1. */
  switchedTo = -1;

  constructor(component: string, settings: CoreSettings) {
    this.#component = component;
    this.settings = settings;
    this.#commissioningLength = settings.commissioning;
    this.#commissioningLeft = settings.commissioning;
    this.#calibrationLive = new Float64Array(settings.calibration);
    this.#calibrationActive = new Float64Array(settings.calibration);
    this.#referenceTrend = new BlockTrend(settings.trendBlock, settings.trendWindow);
    this.#gapTrend = new BlockTrend(settings.trendBlock, settings.trendWindow);
    this.#settlingWindow = new SettlingWindow(settings.settling);
    this.#baselineAlpha = 1 - 2 ** (-1 / settings.baselineHalfLife);
  }

  get index(): number {
    return this.#index;
  }
  get phase(): Phase {
    return this.#phase;
  }
  get skipped(): number {
    return this.#skipped;
  }
  /** Lineage id of the reference the change and trend tests watch. */
  get activeId(): number {
    return this.#activeId;
  }
  /** Lineage id of the newest reference. */
  get newestId(): number {
    return this.#newestId;
  }
  get retrains(): number {
    return this.#retrains;
  }
  get switches(): number {
    return this.#switches;
  }
  get alarms(): number {
    return this.#alarms;
  }
  /** True while a retrain waits for the operator's confirmation. */
  get pending(): boolean {
    return this.#pending;
  }
  /** True while degradation evidence stands (learning stopped, retraining refused). */
  get degradationStanding(): boolean {
    return this.#degradationStanding;
  }
  /** The calibrated level of a reference, or null while it is being calibrated. */
  levelOf(id: number): ScoreLevel | null {
    return this.#levels[id] ?? null;
  }
  /** The anomaly entry threshold in score units, or null before calibration. */
  get anomalyThreshold(): number | null {
    return this.#anomalyEnter === null ? null : Math.exp(this.#anomalyEnter) - this.settings.scoreFloor;
  }
  /** The settling window (its ring positions match the rows the feature mode keeps). */
  get settlingWindow(): SettlingWindow {
    return this.#settlingWindow;
  }

  /** A non-finite sample skipped under nonFinite "skip": counted, nothing else changes. */
  skip(): Decision {
    this.#index += 1;
    this.#skipped += 1;
    this.#clearEffects();
    return this.#decision("hold", this.#phase === "latched" ? (this.#latchCause ?? "normal") : "normal", { liveScore: Number.NaN, referenceScores: [], skipped: this.#skipped });
  }

  /**
   * Decides on one sample from its live score and its scores under the
   * commissioning, newest and active references (score units, ≥ 0).
   */
  step(live: number, commissioning: number, newest: number, active: number): Decision {
    this.#index += 1;
    this.#clearEffects();
    const evidence: Evidence = {
      liveScore: live,
      referenceScores: this.#newestId === 0 ? [commissioning] : [commissioning, newest],
      activeReference: this.#activeId,
    };
    if (this.#phase === "commissioning") return this.#commissioningStep(live, commissioning, evidence);
    if (this.#phase === "retraining") return this.#decision("hold", "concept-drift", evidence);
    const floor = this.settings.scoreFloor;
    const uLive = Math.log(live + floor);
    const uActive = Math.log(active + floor);
    if (this.#calibrationPurpose !== null) return this.#calibrationStep(uLive, uActive, evidence, "concept-drift", "hold");
    const clip = this.settings.scoreClip;
    const liveLevel = this.#liveLevel as ScoreLevel;
    const zLive = normalised(uLive, liveLevel, clip);
    const zActive = normalised(uActive, this.#levels[this.#activeId] as ScoreLevel, clip);
    const zCommissioning = normalised(Math.log(commissioning + floor), this.#levels[0] as ScoreLevel, clip);
    const zNewest = normalised(Math.log(newest + floor), this.#levels[this.#newestId] as ScoreLevel, clip);

    if (this.#phase === "settling") return this.#settlingStep(zActive, zCommissioning, zNewest, evidence);

    // 1. Anomaly, with hysteresis in level and in time: an episode begins above the entry threshold and
    // ends only after `anomalyRun` consecutive samples below the exit threshold; all its samples are held.
    const above = this.#anomalous ? uLive > (this.#anomalyExit as number) : uLive > (this.#anomalyEnter as number);
    if (above || (this.#anomalous && this.#normalRun + 1 < this.settings.anomalyRun)) {
      if (above) {
        this.#anomalyRun += 1;
        this.#normalRun = 0;
      } else this.#normalRun += 1;
      this.#anomalous = true;
      evidence.anomaly = { threshold: this.anomalyThreshold, run: this.#anomalyRun, needed: this.settings.anomalyRun, above };
      if (this.#phase !== "latched" && this.#anomalyRun >= this.settings.anomalyRun) return this.#latch("anomaly", evidence);
      return this.#decision("hold", this.#phase === "latched" ? (this.#latchCause as Cause) : "anomaly", evidence);
    }
    this.#anomalous = false;
    this.#anomalyRun = 0;
    this.#normalRun = 0;

    // 2. Degradation: long decimated trends of the active reference's score and of the reference-minus-live gap.
    this.#referenceTrend.observe(zActive);
    this.#gapTrend.observe(zActive - zLive);
    if (this.#phase === "latched") {
      evidence.trend = this.#referenceTrend.evidence;
      evidence.gap = { value: zActive - zLive, ...this.#gapTrend.evidence };
      return this.#decision("hold", this.#latchCause as Cause, evidence);
    }
    const strength = this.#degradationStrength();
    evidence.trend = this.#referenceTrend.evidence;
    evidence.gap = { value: zActive - zLive, ...this.#gapTrend.evidence };
    if (strength === 2 && !this.#episodeAlarmed) return this.#latch("degradation", evidence);
    if (strength >= 1 && !this.#degradationStanding) this.#warningSince = this.#index;
    const span = this.settings.trendWindow * this.settings.trendBlock;
    if (strength === 1 && this.#degradationStanding && !this.#episodeAlarmed && this.#index - this.#warningSince > span) {
      // A warning that has neither grown into an alarm nor cleared over a whole trend window expires.
      this.#degradationStanding = false;
      this.#warningSince = this.#index;
    } else if (strength >= 1) this.#degradationStanding = true;
    else if (this.#degradationStanding && this.#degradationCleared()) {
      // Learning may resume; a degradation that has raised its alarm keeps refusing retrains until the
      // operator commissions the machine again (wear does not heal; a repair is a new commissioning).
      this.#degradationStanding = false;
      this.#episodeAlarmed = false;
    }

    // 3. Concept drift: the change test on the active reference's normalised score.
    // The change test sees z relative to a slowly following baseline b (EWMA, b ← b + α(z − b)), which
    // removes the error of the calibrated mean (300 samples leave it uncertain by ~0.1 σ, enough to shorten
    // a CUSUM's in-control run length severalfold) and leaves slow trends to the trend windows.
    const test = this.#changeTest as ChangeTest;
    const reading = test.observe(zActive - this.#baseline);
    this.#baseline += this.#baselineAlpha * (zActive - this.#baseline);
    evidence.change = { test: test.name, statistic: reading.statistic, threshold: reading.threshold, status: reading.status, direction: reading.direction ?? null };
    if (reading.status === "change") {
      test.restart();
      if (this.#episodeAlarmed) return this.#decision("hold", "degradation", evidence);
      if (strength >= 1) {
        // A change point on top of a rising trend: the level crept up before it jumped. Reported as
        // degradation; it refuses retrains only while the warning stands (a full trend alarm, or a ramp
        // found while settling, refuses them until the next commissioning).
        return this.#latch("degradation", evidence, strength === 2);
      }
      this.#phase = "settling";
      this.#settlingStart = this.#index;
      this.#risingRun = 0;
      this.#settlingWindow.clear();
      return this.#decision("hold", "concept-drift", evidence);
    }
    if (this.#degradationStanding) return this.#decision("hold", "degradation", evidence);
    return this.#decision("learn", "normal", evidence);
  }

  /**
   * Degradation evidence clears when neither trend is significant any more
   * and the active reference's level (the latest block mean) is back within
   * `confirmShift` σ of normal: a degradation that stops rising but stays up
   * has not gone away.
   */
  #degradationCleared(): boolean {
    const s = this.settings;
    return this.#referenceTrend.z < s.trendClearZ && this.#gapTrend.z < s.trendClearZ && this.#referenceTrend.lastMean < s.confirmShift;
  }

  /**
   * 0: no degradation evidence; 1: a warning (stop learning, refuse retrains); 2: an alarm.
   * The reference's own trend counts at its strength: z past the level and a Theil-Sen rise past
   * `trendMinRise` (half of it for a warning). The reference-minus-live gap, the rise the live
   * model has absorbed, can lend its rise to an alarm only when the reference's own z is at alarm
   * strength: a live model that keeps improving on normal data (a fresh member most of all)
   * widens the gap too, and that is no fault.
   */
  #degradationStrength(): number {
    const s = this.settings;
    const ref = this.#referenceTrend;
    if (ref.blocks < s.trendMinBlocks || ref.z < s.trendWarnZ) return 0;
    const refRise = ref.rise; // the Theil-Sen slope, O(w²), only for a trend this strong
    if (refRise < s.trendMinRise / 2) return 0;
    if (ref.z >= s.trendZ && refRise >= s.trendMinRise) return 2;
    const gap = this.#gapTrend;
    if (ref.z >= s.trendZ && gap.blocks >= s.trendMinBlocks && gap.z >= s.trendZ && gap.rise >= s.trendMinRise) return 2;
    return 1;
  }

  #commissioningStep(live: number, commissioning: number, evidence: Evidence): Decision {
    if (this.#commissioningLeft > 0) {
      this.#commissioningLeft -= 1;
      evidence.commissioning = { progress: (this.#commissioningLength - this.#commissioningLeft) / this.#commissioningLength };
      if (this.#commissioningLeft === 0) {
        this.freezeNow = true;
        this.#calibrationPurpose = "commissioning";
        this.#calibrationFilled = 0;
      }
      return this.#decision("learn", "commissioning", evidence);
    }
    const floor = this.settings.scoreFloor;
    return this.#calibrationStep(Math.log(live + floor), Math.log(commissioning + floor), evidence, "commissioning", "learn");
  }

  #calibrationStep(uLive: number, uActive: number, evidence: Evidence, cause: Cause, action: Action): Decision {
    const n = this.settings.calibration;
    this.#calibrationLive[this.#calibrationFilled] = uLive;
    this.#calibrationActive[this.#calibrationFilled] = uActive;
    this.#calibrationFilled += 1;
    const calibration: Record<string, unknown> = { progress: this.#calibrationFilled / n };
    evidence.calibration = calibration;
    const decision = this.#decision(action, cause, evidence);
    if (this.#calibrationFilled === n) {
      const fallback = this.#finishCalibration();
      if (fallback !== null) calibration.changeThresholdFallback = fallback;
    }
    return decision;
  }

  /** Ends a calibration span; returns why the change threshold fell back to the white-noise value, or null. */
  #finishCalibration(): string | null {
    let fallback: string | null = null;
    const s = this.settings;
    const n = s.calibration;
    const level = levelOf(this.#calibrationActive, n);
    this.#levels[this.#activeId] = level;
    const live = levelOf(this.#calibrationLive, n);
    this.#liveLevel = live;
    const q = quantileOf(this.#calibrationLive, s.anomalyQuantile, n);
    this.#anomalyEnter = q + s.anomalyMargin * live.spread;
    this.#anomalyExit = q + s.anomalyExitMargin * live.spread;
    if (this.#calibrationPurpose === "commissioning" || this.#changeThreshold === null) {
      const z = new Float64Array(n);
      for (let i = 0; i < n; i++) z[i] = normalised(this.#calibrationActive[i] as number, level, s.scoreClip);
      try {
        this.#changeThreshold = calibratedThreshold(s.changeTest, z, s.targetArl0, s.calibrationReplicates, `${String(s.seed)}/change/${this.#index}`);
      } catch (error) {
        // Scores without variation (a constant stream) give the bootstrap nothing to calibrate on: the
        // threshold then falls back to that of independent N(0, 1) scores at the target ARL0.
        if (!(error instanceof StateError)) throw error;
        this.#changeThreshold = gaussianThreshold(s.targetArl0);
        fallback = error.message;
      }
    }
    this.#changeTest = makeChangeTest(s.changeTest, this.#changeThreshold);
    this.#baseline = 0;
    this.#calibrationPurpose = null;
    this.#calibrationFilled = 0;
    this.#phase = "watching";
    this.#anomalous = false;
    this.#anomalyRun = 0;
    this.#normalRun = 0;
    this.#referenceTrend.restart();
    this.#gapTrend.restart();
    // A warning measured against the previous reference does not carry over (an alarm's refusal does).
    this.#degradationStanding = false;
    this.#episodeAlarmed = false;
    return fallback;
  }

  #settlingStep(zActive: number, zCommissioning: number, zNewest: number, evidence: Evidence): Decision {
    const s = this.settings;
    if (this.#pending && !this.#confirmed) return this.#decision("hold", this.#anomalySettling ? "anomaly" : "concept-drift", evidence);
    if (this.#confirmed) {
      evidence.confirmed = true;
      return this.#beginRetrain(evidence);
    }
    // Anomalies while settling are judged against the post-change stream itself: far above the window's level.
    const window = this.#settlingWindow;
    if (window.count >= SETTLING_WARM_UP) {
      const level = window.check();
      const limit = level.activeLevel + s.settlingOutlier * Math.max(level.activeSpread, MIN_WINDOW_SPREAD);
      if (zActive > limit) {
        this.#anomalous = true;
        this.#anomalyRun += 1;
        evidence.anomaly = { level: level.activeLevel, limit, run: this.#anomalyRun, needed: s.anomalyRun };
        if (this.#anomalyRun >= s.anomalyRun) return this.#latch("anomaly", evidence);
        return this.#decision("hold", "anomaly", evidence);
      }
    }
    this.#anomalous = false;
    this.#anomalyRun = 0;
    this.#normalRun = 0;
    this.keptAt = window.push(zActive, zCommissioning, zNewest);
    const elapsed = this.#index - this.#settlingStart;
    const settling: Record<string, unknown> = { samples: this.#settlingWindow.count, needed: s.settling, elapsed, progress: Math.min(1, this.#settlingWindow.count / s.settling) };
    evidence.settling = settling;
    if (!this.#settlingWindow.full) {
      if (elapsed >= s.settlingLimit) return this.#latch("concept-drift", evidence);
      return this.#decision("hold", "concept-drift", evidence);
    }
    const check = this.#settlingWindow.check();
    Object.assign(settling, check);
    const stationary = Math.abs(check.trendZ) < s.settlingTrendZ && Math.abs(check.shift) < s.settlingShift;
    if (!stationary) {
      // A step inside the window leaves it after `settling` samples; a window still rising after that is a ramp.
      this.#risingRun = check.trendZ >= s.settlingTrendZ && check.shift > 0 ? this.#risingRun + 1 : 0;
      settling.risingRun = this.#risingRun;
      if (this.#risingRun >= s.settling) {
        return this.#latch("degradation", evidence);
      }
      if (elapsed >= s.settlingLimit) {
        return this.#latch(check.trendZ > 0 ? "degradation" : "concept-drift", evidence);
      }
      return this.#decision("hold", "concept-drift", evidence);
    }
    return this.#settled(check, evidence);
  }

  #settled(check: SettlingCheck, evidence: Evidence): Decision {
    const s = this.settings;
    if (Math.abs(check.activeLevel) < s.confirmShift) {
      // The active reference still scores the stream as normal: the change was not confirmed.
      evidence.outcome = this.#anomalySettling ? "returned to normal" : "unconfirmed";
      this.#toWatching();
      return this.#decision("learn", "normal", evidence);
    }
    const known = this.#knownMode(check);
    if (known >= 0) return this.switchTo(known, evidence);
    if (this.#degradationAlarmed) {
      // A change on a machine with a degradation alarm behind it is not learnt: it is reported.
      evidence.outcome = "retrain refused: degradation evidence stands";
      return this.#latch("degradation", evidence);
    }
    if (this.#degradationStanding) {
      // A degradation warning refuses the retrain as well, without an alarm of its own.
      evidence.outcome = "retrain refused: a degradation warning stands";
      this.#toWatching();
      return this.#decision("hold", "degradation", evidence);
    }
    if (this.#budgetExhausted()) {
      evidence.budget = { used: this.#retrainLog.length, allowed: s.retrainBudget, horizon: s.retrainHorizon };
      return this.#latch("concept-drift", evidence);
    }
    if (this.#index < this.#coolDownUntil) {
      evidence.coolDown = { until: this.#coolDownUntil };
      return this.#decision("hold", "concept-drift", evidence);
    }
    // An acknowledged anomaly whose level persisted through settling is not learnt without the operator:
    // a clog acknowledged while it lasts must not become the new normal on its own.
    const exitLevel = this.#anomalyExitLevel();
    const persisting = this.#anomalySettling && s.persistentAnomaly === "confirm" && check.activeLevel >= exitLevel;
    if (persisting) evidence.persistentAnomaly = { alarmAt: this.#anomalyAlarmAt, settledLevel: check.activeLevel, exitLevel };
    if (s.retrain === "never") return this.#latch("concept-drift", evidence);
    if (persisting && this.#index < this.#askAfter) {
      evidence.outcome = "held: the operator rejected this level as the new normal";
      return this.#decision("hold", "anomaly", evidence);
    }
    if (persisting) {
      this.#pending = true;
      evidence.outcome = "confirmation needed: the level of an acknowledged anomaly persisted through settling";
      return this.#decision("await-confirmation", "anomaly", evidence);
    }
    if (s.retrain === "confirm") {
      this.#pending = true;
      return this.#decision("await-confirmation", "concept-drift", evidence);
    }
    return this.#beginRetrain(evidence);
  }

  /**
   * The anomaly exit threshold as a normalised score, in σ: the level below
   * which an anomaly episode ends, (u_exit − μ_live)/σ_live. A settled level
   * of the active reference at or above it is an anomaly that persists.
   */
  #anomalyExitLevel(): number {
    const live = this.#liveLevel;
    if (live === null || this.#anomalyExit === null) return Infinity;
    return Math.min(this.settings.scoreClip, (this.#anomalyExit - live.mean) / live.spread);
  }

  /** The reference (commissioning or newest) that scores the settled window as normal, or −1. */
  #knownMode(check: SettlingCheck): number {
    const limit = this.settings.knownModeLevel;
    let best = -1;
    let bestLevel = Infinity;
    if (this.#activeId !== 0 && this.#levels[0] !== undefined && Math.abs(check.commissioningLevel) < limit) {
      best = 0;
      bestLevel = Math.abs(check.commissioningLevel);
    }
    if (this.#activeId !== this.#newestId && this.#levels[this.#newestId] !== undefined && Math.abs(check.newestLevel) < Math.min(limit, bestLevel)) best = this.#newestId;
    return best;
  }

  #budgetExhausted(): boolean {
    const horizon = this.settings.retrainHorizon;
    this.#retrainLog = this.#retrainLog.filter((at) => this.#index - at < horizon);
    return this.#retrainLog.length >= this.settings.retrainBudget;
  }

  #beginRetrain(evidence: Evidence): Decision {
    this.#pending = false;
    this.#confirmed = false;
    this.#anomalySettling = false;
    this.#retrainLog.push(this.#index);
    this.#phase = "retraining";
    return this.#decision("retrain", "concept-drift", evidence);
  }

  /**
   * Switches the active reference to a known mode (lineage id `id`) and
   * returns the switch-mode decision. The engine's feature mode calls it when
   * an older reference, scored on the settled samples, fits better than a retrain.
   */
  switchTo(id: number, evidence: Evidence): Decision {
    if (this.#levels[id] === undefined) throw new StateError(this.#component, `reference ${id} has no calibrated level`);
    this.#activeId = id;
    this.#baseline = 0;
    this.#switches += 1;
    this.#pending = false;
    this.#confirmed = false;
    this.#coolDownUntil = this.#index + this.settings.coolDown;
    this.#toWatching();
    this.#referenceTrend.restart();
    this.#gapTrend.restart();
    this.#degradationStanding = false;
    this.#episodeAlarmed = false;
    this.switchedTo = id;
    evidence.switchedTo = id;
    return this.#decision("switch-mode", "known-mode", evidence);
  }

  #toWatching(): void {
    this.#phase = "watching";
    this.#anomalySettling = false;
    this.#settlingWindow.clear();
    this.#settlingStart = -1;
    this.#changeTest?.restart();
  }

  #latch(cause: Cause, evidence: Evidence, lasting = true): Decision {
    if (cause === "degradation") {
      this.#degradationStanding = true;
      this.#episodeAlarmed = true;
      if (lasting) this.#degradationAlarmed = true;
    }
    this.#phase = "latched";
    this.#latchCause = cause;
    this.#alarms += 1;
    this.#anomalySettling = false;
    if (cause === "anomaly") this.#anomalyAlarmAt = this.#index;
    this.#pending = false;
    this.#confirmed = false;
    this.#settlingWindow.clear();
    this.#settlingStart = -1;
    return this.#decision("alarm", cause, evidence);
  }

  #decision(action: Action, cause: Cause, evidence: Evidence): Decision {
    return { index: this.#index, action, cause, phase: this.#phase, evidence };
  }

  #clearEffects(): void {
    this.freezeNow = false;
    this.keptAt = -1;
    this.switchedTo = -1;
  }

  #stateError(call: string, allowed: string): never {
    throw new StateError(this.#component, `${call}() is allowed only ${allowed}; the engine is ${this.#pending ? "awaiting confirmation" : `in phase "${this.#phase}"`}`);
  }

  /** The host's new model is in service (answer to a "retrain" decision): calibrate it as the newest reference. */
  modelReplaced(): void {
    if (this.#phase !== "retraining") this.#stateError("modelReplaced", 'after a "retrain" decision');
    this.#newestId += 1;
    this.#activeId = this.#newestId;
    this.#retrains += 1;
    this.#coolDownUntil = this.#index + this.settings.coolDown;
    this.#phase = "watching";
    this.#settlingWindow.clear();
    this.#settlingStart = -1;
    this.#beginRecalibration();
  }

  /** The candidate failed validation (or the host could not replace its model): settle again. */
  retrainFailed(): void {
    if (this.#phase !== "retraining") this.#stateError("retrainFailed", 'after a "retrain" decision');
    this.#phase = "settling";
    this.#settlingWindow.clear();
    this.#settlingStart = this.#index;
    this.#risingRun = 0;
  }

  #beginRecalibration(): void {
    this.#calibrationPurpose = "recalibration";
    this.#calibrationFilled = 0;
    this.#anomalous = false;
    this.#anomalyRun = 0;
    this.#normalRun = 0;
  }

  /** Operator: go ahead with the retrain the engine awaits confirmation for (it starts with the next sample). */
  confirmRetrain(): void {
    if (!this.#pending || this.#confirmed) this.#stateError("confirmRetrain", 'while a retrain awaits confirmation (after "await-confirmation")');
    this.#confirmed = true;
  }

  /**
   * Operator: refuse the pending retrain. After a drift the new level is
   * accepted without retraining: the active reference is calibrated again on
   * the next samples. After an anomaly whose level persisted, the engine keeps
   * holding: it settles again, goes back to watching when the scores return
   * to normal, and asks again only after `settlingLimit` samples.
   * In score-only mode it also answers a "retrain" the host could not carry out.
   */
  rejectRetrain(): void {
    const waiting = this.#pending && !this.#confirmed;
    if (!waiting && this.#phase !== "retraining") this.#stateError("rejectRetrain", "while a retrain awaits confirmation or is in progress");
    if (waiting && this.#anomalySettling) {
      this.#pending = false;
      this.#askAfter = this.#index + 1 + this.settings.settlingLimit;
      this.#settlingWindow.clear();
      this.#settlingStart = this.#index;
      this.#risingRun = 0;
      return;
    }
    this.#pending = false;
    this.#confirmed = false;
    this.#phase = "watching";
    this.#toWatching();
    this.#beginRecalibration();
  }

  /** Operator: clear the alarm latch. */
  acknowledge(): void {
    if (this.#phase !== "latched") this.#stateError("acknowledge", "while an alarm is latched");
    const cause = this.#latchCause;
    this.#latchCause = null;
    this.#toWatching();
    this.#anomalous = false;
    this.#anomalyRun = 0;
    this.#normalRun = 0;
    if (cause === "anomaly") {
      // Whatever follows an acknowledged anomaly settles first: a level that returns to normal is not
      // confirmed, a known mode is switched to, and a level that persists at the anomaly's height waits for
      // the operator's confirmation (persistentAnomaly "confirm"); nothing is learnt meanwhile.
      this.#phase = "settling";
      this.#settlingStart = this.#index;
      this.#risingRun = 0;
      this.#anomalySettling = true;
      this.#askAfter = 0;
    }
    if (cause === "degradation") this.#degradationStanding = true;
    if (cause === "concept-drift") {
      // An unexplained change the operator has seen: accept its level without retraining.
      this.#referenceTrend.restart();
      this.#gapTrend.restart();
      this.#beginRecalibration();
    }
  }

  /** Operator: start a commissioning window of `n` samples; afterwards a new commissioning reference is frozen and everything is calibrated again. */
  startCommissioning(n: number): void {
    if (this.#phase === "commissioning") this.#stateError("startCommissioning", "outside commissioning");
    this.#phase = "commissioning";
    this.#latchCause = null;
    this.#commissioningLength = n;
    this.#commissioningLeft = n;
    this.#calibrationPurpose = null;
    this.#calibrationFilled = 0;
    this.#levels = [];
    this.#liveLevel = null;
    this.#anomalyEnter = null;
    this.#anomalyExit = null;
    this.#changeTest = null;
    this.#changeThreshold = null;
    this.#activeId = 0;
    this.#newestId = 0;
    this.#anomalous = false;
    this.#anomalyRun = 0;
    this.#normalRun = 0;
    this.#degradationStanding = false;
    this.#degradationAlarmed = false;
    this.#episodeAlarmed = false;
    this.#pending = false;
    this.#confirmed = false;
    this.#anomalySettling = false;
    this.#askAfter = 0;
    this.#settlingWindow.clear();
    this.#settlingStart = -1;
    this.#referenceTrend.restart();
    this.#gapTrend.restart();
  }

  snapshot(): Snapshot<DecisionCoreState> {
    const settings: Record<string, unknown> = {};
    for (const key of CORE_OPTION_NAMES) settings[key] = this.settings[key];
    return envelope(DecisionCore.kind, DecisionCore.version, {
      settings,
      index: this.#index,
      skipped: this.#skipped,
      phase: this.#phase,
      latchCause: this.#latchCause,
      commissioningLength: this.#commissioningLength,
      commissioningLeft: this.#commissioningLeft,
      calibrationPurpose: this.#calibrationPurpose,
      calibrationFilled: this.#calibrationFilled,
      calibrationLive: toPlainArray(this.#calibrationLive),
      calibrationActive: toPlainArray(this.#calibrationActive),
      levels: this.#levels.map((l) => ({ mean: l.mean, spread: l.spread })),
      liveLevel: this.#liveLevel === null ? null : { mean: this.#liveLevel.mean, spread: this.#liveLevel.spread },
      anomalyEnter: this.#anomalyEnter,
      anomalyExit: this.#anomalyExit,
      changeThreshold: this.#changeThreshold,
      changeTest: this.#changeTest === null ? null : this.#changeTest.snapshot(),
      baseline: this.#baseline,
      activeId: this.#activeId,
      newestId: this.#newestId,
      anomalous: this.#anomalous,
      anomalyRun: this.#anomalyRun,
      normalRun: this.#normalRun,
      referenceTrend: this.#referenceTrend.snapshot(),
      gapTrend: this.#gapTrend.snapshot(),
      degradationStanding: this.#degradationStanding,
      degradationAlarmed: this.#degradationAlarmed,
      episodeAlarmed: this.#episodeAlarmed,
      warningSince: this.#warningSince,
      settlingWindow: this.#settlingWindow.snapshot(),
      settlingStart: this.#settlingStart,
      risingRun: this.#risingRun,
      pending: this.#pending,
      confirmed: this.#confirmed,
      anomalySettling: this.#anomalySettling,
      anomalyAlarmAt: this.#anomalyAlarmAt,
      askAfter: this.#askAfter,
      retrainLog: [...this.#retrainLog],
      coolDownUntil: this.#coolDownUntil,
      retrains: this.#retrains,
      switches: this.#switches,
      alarms: this.#alarms,
    });
  }

  /** Rebuilds a core from {@link DecisionCore.snapshot}; `component` names it in errors. */
  static restore(snapshot: unknown, component: string): DecisionCore {
    const r: SnapshotReader = openSnapshot(snapshot, DecisionCore.kind, DecisionCore.version);
    const settingsReader = r.object("settings");
    const raw: Record<string, unknown> = {};
    for (const key of CORE_OPTION_NAMES) raw[key] = settingsReader.raw(key);
    let settings: CoreSettings;
    try {
      settings = resolveCoreSettings(component, raw);
    } catch (error) {
      r.fail("settings", `are not valid options: ${(error as Error).message}`);
    }
    const big = Number.MAX_SAFE_INTEGER;
    const index = r.integer("index", -1, big);
    const skipped = r.integer("skipped", 0, big);
    const phase = r.oneOf("phase", PHASES);
    const latchCause = r.stringOrNull("latchCause");
    if (latchCause !== null && !CAUSES.includes(latchCause as Cause)) r.fail("latchCause", `must be a cause or null, got ${JSON.stringify(latchCause)}`);
    if ((phase === "latched") !== (latchCause !== null)) r.fail("latchCause", "must be set exactly when the phase is latched");
    const commissioningLength = r.integer("commissioningLength", 1, 2 ** 31 - 1);
    const commissioningLeft = r.integer("commissioningLeft", 0, commissioningLength);
    const purposeRaw = r.stringOrNull("calibrationPurpose");
    if (purposeRaw !== null && purposeRaw !== "commissioning" && purposeRaw !== "recalibration") r.fail("calibrationPurpose", `must be "commissioning", "recalibration" or null, got ${JSON.stringify(purposeRaw)}`);
    const calibrationPurpose = purposeRaw as CalibrationPurpose | null;
    const calibrationFilled = r.integer("calibrationFilled", 0, settings.calibration - 1);
    const calibrationLive = r.numbers("calibrationLive", settings.calibration);
    const calibrationActive = r.numbers("calibrationActive", settings.calibration);
    const newestId = r.integer("newestId", 0, 1_000_000);
    const levels = r.objects("levels", { max: newestId + 1 }).map(readLevel);
    const activeId = r.integer("activeId", 0, newestId);
    const liveReader = r.objectOrNull("liveLevel");
    const liveLevel = liveReader === null ? null : readLevel(liveReader);
    const anomalyEnter = r.numberOrNull("anomalyEnter");
    const anomalyExit = r.numberOrNull("anomalyExit");
    const changeThreshold = r.numberOrNull("changeThreshold");
    if (changeThreshold !== null && !(changeThreshold > 0)) r.fail("changeThreshold", `must be > 0 or null, got ${changeThreshold}`);
    const changeTest = r.raw("changeTest") === null ? null : restoreTest(r.raw("changeTest"));
    const baseline = r.number("baseline");
    const calibrated = phase !== "commissioning" && calibrationPurpose !== "commissioning";
    if (calibrated && (liveLevel === null || anomalyEnter === null || anomalyExit === null || changeTest === null || levels[0] === undefined)) {
      r.fail("liveLevel", "and the thresholds must be set once commissioning is over");
    }
    if (calibrated && calibrationPurpose === null && levels.length !== newestId + 1) r.fail("levels", `must have length ${newestId + 1}, got length ${levels.length}`);
    const anomalous = r.boolean("anomalous");
    const anomalyRun = r.integer("anomalyRun", 0, big);
    const normalRun = r.integer("normalRun", 0, settings.anomalyRun);
    const referenceTrend = BlockTrend.restore(r.raw("referenceTrend"), settings.trendBlock, settings.trendWindow);
    const gapTrend = BlockTrend.restore(r.raw("gapTrend"), settings.trendBlock, settings.trendWindow);
    const degradationStanding = r.boolean("degradationStanding");
    const degradationAlarmed = r.boolean("degradationAlarmed");
    const episodeAlarmed = r.boolean("episodeAlarmed");
    const warningSince = r.integer("warningSince", 0, big);
    const settlingWindow = SettlingWindow.restore(r.raw("settlingWindow"), settings.settling);
    const settlingStart = r.integer("settlingStart", -1, big);
    const risingRun = r.integer("risingRun", 0, big);
    const pending = r.boolean("pending");
    const confirmed = r.boolean("confirmed");
    if (confirmed && !pending) r.fail("confirmed", "can be true only while pending");
    const anomalySettling = r.boolean("anomalySettling");
    if (anomalySettling && phase !== "settling") r.fail("anomalySettling", `can be true only while settling, the phase is "${phase}"`);
    const anomalyAlarmAt = r.integer("anomalyAlarmAt", -1, Math.max(-1, index));
    const askAfter = r.integer("askAfter", 0, big);
    const retrainLog = r.integers("retrainLog", { max: settings.retrainBudget + 1 }, 0, big);
    const coolDownUntil = r.integer("coolDownUntil", 0, big);
    const retrains = r.integer("retrains", 0, big);
    const switches = r.integer("switches", 0, big);
    const alarms = r.integer("alarms", 0, big);

    const core = new DecisionCore(component, settings);
    core.#index = index;
    core.#skipped = skipped;
    core.#phase = phase;
    core.#latchCause = latchCause as Cause | null;
    core.#commissioningLength = commissioningLength;
    core.#commissioningLeft = commissioningLeft;
    core.#calibrationPurpose = calibrationPurpose;
    core.#calibrationFilled = calibrationFilled;
    core.#calibrationLive.set(calibrationLive);
    core.#calibrationActive.set(calibrationActive);
    core.#levels = levels;
    core.#liveLevel = liveLevel;
    core.#anomalyEnter = anomalyEnter;
    core.#anomalyExit = anomalyExit;
    core.#changeThreshold = changeThreshold;
    core.#changeTest = changeTest;
    core.#baseline = baseline;
    core.#activeId = activeId;
    core.#newestId = newestId;
    core.#anomalous = anomalous;
    core.#anomalyRun = anomalyRun;
    core.#normalRun = normalRun;
    core.#referenceTrend = referenceTrend;
    core.#gapTrend = gapTrend;
    core.#degradationStanding = degradationStanding;
    core.#degradationAlarmed = degradationAlarmed;
    core.#episodeAlarmed = episodeAlarmed;
    core.#warningSince = warningSince;
    core.#settlingWindow = settlingWindow;
    core.#settlingStart = settlingStart;
    core.#risingRun = risingRun;
    core.#pending = pending;
    core.#confirmed = confirmed;
    core.#anomalySettling = anomalySettling;
    core.#anomalyAlarmAt = anomalyAlarmAt;
    core.#askAfter = askAfter;
    core.#retrainLog = retrainLog;
    core.#coolDownUntil = coolDownUntil;
    core.#retrains = retrains;
    core.#switches = switches;
    core.#alarms = alarms;
    return core;
  }
}

function readLevel(r: SnapshotReader): ScoreLevel {
  const mean = r.number("mean");
  const spread = r.number("spread");
  if (!(spread > 0)) r.fail("spread", `must be > 0, got ${spread}`);
  return { mean, spread };
}
