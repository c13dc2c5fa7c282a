import { StateError, type Snapshot } from "@leeway/core";
import { readCoreSnapshot, writeCoreSnapshot, type CoreSnapshotState } from "./core-snapshot.js";
import type { Action, Cause, Decision, Evidence, Phase } from "./decision.js";
import type { CoreSettings } from "./options.js";
import { normalised, type ScoreLevel } from "./calibration.js";
import { LEARN_ONLY, NO_EFFECTS, type Effect, type EffectOutcome, type Step } from "./effects.js";
import { AnomalyEpisode } from "./anomaly-episode.js";
import { DegradationMonitor } from "./degradation-monitor.js";
import { ChangeWatch } from "./change-watch.js";
import { CalibrationSpan } from "./calibration-span.js";
import { RetrainGate } from "./retrain-gate.js";
import { Settling } from "./settling.js";
import type { SettlingCheck } from "./settling-window.js";
import { FeatureAttribution, signatureHalfLife } from "./feature-attribution.js";
import type { FeatureSignature, SignatureLimits } from "./feature-signature.js";
import { SiteShiftNotice } from "./site-shift-notice.js";

/** Samples a settling window needs before its own level judges anomalies. */
const SETTLING_WARM_UP = 20;
/** Anomaly runs an episode too weak for its feature signature to be judged may last before it alarms. */
const UNDETERMINED_RUNS = 4;
/** The smallest window spread used in that judgement, in σ. */
const MIN_WINDOW_SPREAD = 0.05;
/** Cosine between an anomaly episode's feature shift and the standing degradation's above which it is that degradation. */
const DEGRADATION_AGREEMENT = 0.5;
/** The last commissioning sample: learn it, then freeze the live model as the commissioning reference. */
const LEARN_THEN_FREEZE: readonly Effect[] = Object.freeze([{ kind: "learn" }, { kind: "freeze-commissioning" }]);

/** The scores of one sample (score units, ≥ 0): live model, commissioning, newest and active references. */
export interface SampleScores {
  live: number;
  commissioning: number;
  newest: number;
  active: number;
  /** Feature mode: the active reference's signed residual per feature (input minus reconstruction), for attribution. */
  residual?: Float64Array;
}

/** The parts a core is made of; {@link DecisionCore} owns them, its snapshot holds theirs. */
export interface CoreParts {
  anomaly: AnomalyEpisode;
  degradation: DegradationMonitor;
  change: ChangeWatch;
  calibration: CalibrationSpan;
  gate: RetrainGate;
  settling: Settling;
  attribution: FeatureAttribution;
  siteShift: SiteShiftNotice;
}

/** The core's own counters and lineage bookkeeping (plain data). */
export interface CoreLedger {
  index: number;
  skipped: number;
  phase: Phase;
  latchCause: Cause | null;
  commissioningLength: number;
  commissioningLeft: number;
  levels: ScoreLevel[];
  liveLevel: ScoreLevel | null;
  activeId: number;
  newestId: number;
  retrains: number;
  switches: number;
  alarms: number;
  /** Index of the last anomaly alarm, or −1. */
  anomalyAlarmAt: number;
  /** Index of the alarm now latched (or of its last reminder), or −1. */
  latchedAt: number;
  /** Unattended: consecutive normal samples while an anomaly is latched. */
  latchNormalRun: number;
  /**
   * ln of the active reference's score at an acknowledged anomaly alarm whose
   * event is still open, or null: a new anomaly alarm needs ln(realarmFactor) more.
   */
  openAnomaly: number | null;
  /** The same for an acknowledged degradation alarm (open while its evidence stands). */
  openDegradation: number | null;
  /** ln of the active reference's score at the latest alarm. */
  alarmLevel: number;
}

/**
 * The decision core that both feeding modes share: per sample it sees the
 * live model's score and the scores under the frozen references and returns
 * the decision with the effects the model side must carry out ({@link Step}).
 *
 * Method (one sample, read {@link DecisionCore.step} top-down): scores go to
 * the log scale and are normalised by the levels measured while calibrating
 * each model, z = (ln(s + floor) − μ)/σ.
 * 1. Anomaly ({@link AnomalyEpisode}): the live log score above the
 *    calibrated threshold → hold; a run of them → alarm "anomaly".
 * 2. Degradation ({@link DegradationMonitor}): long Mann-Kendall windows of
 *    the active reference's z and of the gap z_reference − z_live; a
 *    significant rise → alarm "degradation"; a weaker one stops learning.
 * 3. Concept drift ({@link ChangeWatch}): a calibrated change test on the
 *    active reference's z fires → settling ({@link Settling}): nothing learnt
 *    until the post-change window is stationary. Then a shift below
 *    `confirmShift` σ was a false alarm; a reference that scores the window as
 *    normal is a known mode (switch-mode); otherwise retrain (auto, confirm or
 *    never) through the {@link RetrainGate} (budget, cool-down, operator).
 * 4. After an acknowledged anomaly alarm the engine settles too; a settled
 *    level still at the anomaly's height waits for the operator.
 *
 * The operator calls are the methods at the end of this file; the snapshot
 * format lives in `core-snapshot.ts`.
 */
export class DecisionCore {
  readonly settings: CoreSettings;
  readonly component: string;
  readonly #ledger: CoreLedger;
  readonly #parts: CoreParts;

  constructor(component: string, settings: CoreSettings, restored?: { ledger: CoreLedger; parts: CoreParts }) {
    this.component = component;
    this.settings = settings;
    this.#ledger = restored?.ledger ?? {
      index: -1,
      skipped: 0,
      phase: "commissioning",
      latchCause: null,
      commissioningLength: settings.commissioning,
      commissioningLeft: settings.commissioning,
      levels: [],
      liveLevel: null,
      activeId: 0,
      newestId: 0,
      retrains: 0,
      switches: 0,
      alarms: 0,
      anomalyAlarmAt: -1,
      latchedAt: -1,
      latchNormalRun: 0,
      openAnomaly: null,
      openDegradation: null,
      alarmLevel: 0,
    };
    this.#parts = restored?.parts ?? {
      anomaly: new AnomalyEpisode(),
      degradation: new DegradationMonitor(settings),
      change: new ChangeWatch(settings),
      calibration: new CalibrationSpan(settings.calibration),
      gate: new RetrainGate(settings),
      settling: new Settling(settings.settling),
      attribution: new FeatureAttribution(signatureHalfLife(settings)),
      siteShift: new SiteShiftNotice(),
    };
  }

  get index(): number {
    return this.#ledger.index;
  }
  get phase(): Phase {
    return this.#ledger.phase;
  }
  /** Lineage id of the reference the change and trend tests watch. */
  get activeId(): number {
    return this.#ledger.activeId;
  }
  /** Lineage id of the newest reference. */
  get newestId(): number {
    return this.#ledger.newestId;
  }
  /** True while a retrain waits for the operator's confirmation. */
  get pending(): boolean {
    return this.#parts.gate.pending;
  }
  /** The anomaly entry threshold in score units, or null before calibration. */
  get anomalyThreshold(): number | null {
    return this.#parts.anomaly.threshold(this.settings.scoreFloor);
  }

  /** Retrains accepted so far. */
  get retrains(): number {
    return this.#ledger.retrains;
  }
  /** Switches to a known mode so far. */
  get switches(): number {
    return this.#ledger.switches;
  }
  /** Alarms raised so far. */
  get alarms(): number {
    return this.#ledger.alarms;
  }
  /** Non-finite samples skipped. */
  get skipped(): number {
    return this.#ledger.skipped;
  }

  /** The whole core as plain data. */
  snapshot(): Snapshot<CoreSnapshotState> {
    return writeCoreSnapshot(this.settings, this.#ledger, this.#parts);
  }

  /** Rebuilds a core from {@link DecisionCore.snapshot}; `component` names it in errors. */
  static restore(snapshot: unknown, component: string): DecisionCore {
    const { settings, ledger, parts } = readCoreSnapshot(snapshot, component);
    return new DecisionCore(component, settings, { ledger, parts });
  }

  /** A non-finite sample skipped under nonFinite "skip": counted, nothing else changes. */
  skip(): Step {
    const l = this.#ledger;
    l.index += 1;
    l.skipped += 1;
    return this.#step("hold", l.phase === "latched" ? (l.latchCause ?? "normal") : "normal", { liveScore: Number.NaN, referenceScores: [], skipped: l.skipped });
  }

  /** Decides on one sample from its scores. */
  step(scores: SampleScores): Step {
    const l = this.#ledger;
    const p = this.#parts;
    const s = this.settings;
    l.index += 1;
    const evidence: Evidence = {
      liveScore: scores.live,
      referenceScores: l.newestId === 0 ? [scores.commissioning] : [scores.commissioning, scores.newest],
      activeReference: l.activeId,
    };
    if (l.phase === "retraining") return this.#step("hold", "concept-drift", evidence);
    p.attribution.observe(scores.residual, l.activeId);
    if (l.phase === "commissioning") return this.#commissioningStep(scores, evidence);
    const uLive = Math.log(scores.live + s.scoreFloor);
    const uActive = Math.log(scores.active + s.scoreFloor);
    this.#uActive = uActive;
    if (p.calibration.purpose !== null) return this.#calibrationStep(uLive, uActive, evidence, "concept-drift", "hold");
    const zLive = normalised(uLive, l.liveLevel as ScoreLevel, s.scoreClip);
    const zActive = normalised(uActive, l.levels[l.activeId] as ScoreLevel, s.scoreClip);
    if (l.phase === "settling") {
      const zCommissioning = normalised(Math.log(scores.commissioning + s.scoreFloor), l.levels[0] as ScoreLevel, s.scoreClip);
      const zNewest = normalised(Math.log(scores.newest + s.scoreFloor), l.levels[l.newestId] as ScoreLevel, s.scoreClip);
      return this.#settlingStep(zActive, zCommissioning, zNewest, evidence);
    }

    // 1. Anomaly: every sample of an episode is held; `anomalyRun` samples above (or fewer far above:
    //    `anomalyExcess`) raise the alarm, unless the features say the rise is broadband (a change of
    //    conditions): then the engine settles instead.
    const wasAnomalous = p.anomaly.anomalous;
    if (p.anomaly.observe(uLive, s.anomalyRun)) {
      if (wasAnomalous) p.attribution.extendEpisode();
      else p.attribution.beginEpisode();
      evidence.anomaly = { threshold: this.anomalyThreshold, run: p.anomaly.run, needed: s.anomalyRun, above: p.anomaly.above, excess: p.anomaly.excess };
      const due = p.anomaly.due(s.anomalyRun, s.anomalyExcess);
      // A lone sample above the threshold does not count against a latch clearing itself; a run does.
      if (l.phase === "latched") return this.#latchedStep(evidence, !due);
      if (due) {
        if (p.siteShift.covers(l.index) && !this.#degrading()) {
          evidence.siteShift = p.siteShift.evidence("settling instead of an anomaly alarm: the site shifted");
          return this.#settleChange(evidence, "the site shifted: settling as a change of conditions");
        }
        const signature = this.#episodeSignature(evidence);
        if (signature?.broadband === true) return this.#settleChange(evidence, "a broadband rise: settling as a change of conditions");
        // Too weak yet to tell a change of conditions from a fault's lines: hold up to four runs before alarming.
        if (signature !== null && !signature.determined && p.anomaly.run < UNDETERMINED_RUNS * s.anomalyRun) return this.#step("hold", "anomaly", evidence);
        if (p.degradation.standing && this.#continuesDegradation(evidence)) return this.#latch("degradation", evidence);
        return this.#latch("anomaly", evidence);
      }
      return this.#step("hold", "anomaly", evidence);
    }

    // 2. Degradation: long decimated trends of the active reference's score and of the reference-minus-live gap.
    p.degradation.observe(zActive, zLive, l.index);
    if (l.phase === "latched") {
      Object.assign(evidence, p.degradation.evidence(zActive, zLive));
      return this.#latchedStep(evidence, true);
    }
    let strength = p.degradation.strength();
    Object.assign(evidence, p.degradation.evidence(zActive, zLive));
    if (strength >= 1 && !p.degradation.episodeAlarmed && this.#presentBroadband(evidence)) {
      // A broadband rise is conditions changing (a ramp of the noise floor, a warmer season), not wear: settle on it.
      p.attribution.beginEpisode();
      return this.#settleChange(evidence, "a broadband trend: settling as a change of conditions");
    }
    if (strength === 2 && !p.degradation.episodeAlarmed) return this.#latch("degradation", evidence);
    p.degradation.carry(strength, l.index);
    if (!p.degradation.standing) l.openDegradation = null;

    // 3. Concept drift: the change test on the active reference's normalised score.
    const reading = p.change.observe(zActive);
    evidence.change = p.change.evidence(reading);
    if (reading.status === "change") {
      p.change.restart();
      p.attribution.beginEpisode();
      if (p.degradation.episodeAlarmed) return this.#step("hold", "degradation", evidence);
      if (strength >= 1 && this.#presentBroadband(evidence)) strength = 0;
      // A change point on top of a rising trend: the level crept up before it jumped. Reported as
      // degradation; it refuses retrains only while the warning stands (a full trend alarm refuses them
      // until the next commissioning).
      if (strength >= 1) return this.#latch("degradation", evidence, strength === 2);
      // Settling starts where the level most probably moved (the change-point posterior), not at the alarm.
      l.phase = "settling";
      const onset = p.change.onset(l.index);
      evidence.onset = onset;
      p.settling.begin(onset.at);
      return this.#step("hold", "concept-drift", evidence);
    }
    if (p.degradation.standing) return this.#step("hold", "degradation", evidence);
    return this.#step("learn", "normal", evidence, LEARN_ONLY);
  }

  /**
   * A rise past the anomaly threshold on a machine whose degradation evidence
   * stands is that degradation growing when it points the same way: with
   * residuals, the episode's feature shift agrees (cosine ≥
   * DEGRADATION_AGREEMENT) with the shift before it; without, when the
   * degradation was alarmed or its trend still carries a warning. A new fault
   * on other features is an anomaly of its own and pages.
   */
  #continuesDegradation(evidence: Evidence): boolean {
    const p = this.#parts;
    const agreement = p.attribution.agreement(this.#ledger.activeId);
    if (agreement !== null) {
      evidence.degradationAgreement = agreement;
      return agreement >= DEGRADATION_AGREEMENT;
    }
    return p.degradation.episodeAlarmed || p.degradation.strength() >= 1;
  }

  /** The sample's ln active score (set by step before the rules run). */
  #uActive = 0;

  #limits(): SignatureLimits {
    const s = this.settings;
    return { minSpread: s.broadbandSpread, maxLocality: s.broadbandLocality, minStrength: s.signatureStrength };
  }

  /** The present episode's feature signature (also put in the evidence), or null without residuals. */
  #episodeSignature(evidence: Evidence): FeatureSignature | null {
    const signature = this.#parts.attribution.episode(this.#ledger.activeId, this.#limits());
    if (signature !== null) evidence.features = signature;
    return this.settings.featureSignature === "rules" ? signature : null;
  }

  /** True when the present (exponentially weighted) deviation is broadband; its signature goes in the evidence. */
  #presentBroadband(evidence: Evidence): boolean {
    const signature = this.#parts.attribution.present(this.#ledger.activeId, this.#limits());
    if (signature !== null) evidence.features = signature;
    return this.settings.featureSignature === "rules" && signature?.broadband === true;
  }

  /** A change of conditions: hold and settle on it (nothing learnt until the stream is stationary). */
  #settleChange(evidence: Evidence, outcome: string): Step {
    const l = this.#ledger;
    evidence.outcome = outcome;
    this.#parts.anomaly.clear();
    l.phase = "settling";
    this.#parts.settling.begin(l.index);
    return this.#step("hold", "concept-drift", evidence);
  }

  /**
   * A latched sample: held under the latch's cause. Attended, an alarm nobody
   * acknowledged is raised again every `reminder` samples. Unattended, an
   * anomaly's latch clears itself after `latchClear` normal samples (and a
   * concept-drift latch accepts the level after as many samples).
   */
  #latchedStep(evidence: Evidence, normal: boolean): Step {
    const l = this.#ledger;
    const s = this.settings;
    const cause = l.latchCause as Cause;
    if (s.attendance === "attended") {
      if (s.reminder > 0 && l.index - l.latchedAt >= s.reminder) {
        l.latchedAt = l.index;
        l.alarms += 1;
        evidence.reminder = { alarmCause: cause, every: s.reminder };
        return this.#step("alarm", cause, evidence);
      }
      return this.#step("hold", cause, evidence);
    }
    if (cause === "anomaly" || cause === "concept-drift") {
      l.latchNormalRun = normal || cause === "concept-drift" ? l.latchNormalRun + 1 : 0;
      if (l.latchNormalRun >= s.latchClear) {
        evidence.outcome = cause === "anomaly" ? `the latch cleared itself: scores normal for ${s.latchClear} samples` : `the new level is accepted after ${s.latchClear} samples`;
        this.#clearLatch();
        return this.#step("hold", cause, evidence);
      }
    }
    return this.#step("hold", cause, evidence);
  }

  #commissioningStep(scores: SampleScores, evidence: Evidence): Step {
    const l = this.#ledger;
    if (l.commissioningLeft > 0) {
      l.commissioningLeft -= 1;
      evidence.commissioning = { progress: (l.commissioningLength - l.commissioningLeft) / l.commissioningLength };
      if (l.commissioningLeft > 0) return this.#step("learn", "commissioning", evidence, LEARN_ONLY);
      this.#parts.calibration.begin("commissioning");
      this.#parts.attribution.beginCalibration();
      return this.#step("learn", "commissioning", evidence, LEARN_THEN_FREEZE);
    }
    const floor = this.settings.scoreFloor;
    return this.#calibrationStep(Math.log(scores.live + floor), Math.log(scores.commissioning + floor), evidence, "commissioning", "learn");
  }

  #calibrationStep(uLive: number, uActive: number, evidence: Evidence, cause: Cause, action: Action): Step {
    const p = this.#parts;
    const l = this.#ledger;
    const s = this.settings;
    p.calibration.push(uLive, uActive);
    p.attribution.calibrate();
    const calibration: Record<string, unknown> = { progress: p.calibration.progress };
    evidence.calibration = calibration;
    const step = this.#step(action, cause, evidence, action === "learn" ? LEARN_ONLY : NO_EFFECTS);
    if (!p.calibration.full) return step;
    const result = p.calibration.finish(s.anomalyQuantile, s.scoreClip);
    l.levels[l.activeId] = result.active;
    l.liveLevel = result.live;
    p.anomaly.calibrate(result.liveQuantile, result.live, s.anomalyMargin, s.anomalyExitMargin);
    const fallback = p.change.arm(result.activeZ, `${String(s.seed)}/change/${l.index}`, result.purpose === "commissioning");
    if (fallback !== null) calibration.changeThresholdFallback = fallback;
    l.phase = "watching";
    p.degradation.newLevel();
    p.attribution.finishCalibration(l.activeId);
    return step;
  }

  #settlingStep(zActive: number, zCommissioning: number, zNewest: number, evidence: Evidence): Step {
    const s = this.settings;
    const p = this.#parts;
    const l = this.#ledger;
    p.attribution.extendEpisode();
    p.siteShift.follow(p.settling.start, l.index);
    if (p.gate.waiting) {
      // A question nobody answered while the level grew by the re-alarm factor becomes an alarm.
      if (this.#uActive >= l.alarmLevel + Math.log(s.realarmFactor)) {
        evidence.outcome = "the level grew while the question waited";
        return this.#latch(p.settling.afterAnomaly || p.degradation.standing ? "anomaly" : "concept-drift", evidence);
      }
      return this.#step("hold", p.settling.afterAnomaly ? "anomaly" : "concept-drift", evidence);
    }
    if (p.gate.confirmed) {
      evidence.confirmed = true;
      return this.#beginRetrain(evidence);
    }
    // Anomalies while settling are judged against the post-change stream itself: far above the window's level.
    const window = p.settling.window;
    if (window.count >= SETTLING_WARM_UP) {
      const level = window.check();
      const limit = level.activeLevel + s.settlingOutlier * Math.max(level.activeSpread, MIN_WINDOW_SPREAD);
      if (zActive > limit) {
        p.anomaly.countOutlier();
        evidence.anomaly = { level: level.activeLevel, limit, run: p.anomaly.run, needed: s.anomalyRun };
        if (p.anomaly.run >= s.anomalyRun) return this.#latch("anomaly", evidence);
        return this.#step("hold", "anomaly", evidence);
      }
    }
    p.anomaly.clear();
    const position = window.push(zActive, zCommissioning, zNewest);
    const keep: Effect[] = [{ kind: "keep", position }];
    const elapsed = l.index - p.settling.start;
    const settling: Record<string, unknown> = { samples: window.count, needed: s.settling, elapsed, progress: Math.min(1, window.count / s.settling) };
    evidence.settling = settling;
    if (!window.full) {
      if (elapsed >= s.settlingLimit) return this.#unsettled("concept-drift", evidence, keep);
      return this.#step("hold", "concept-drift", evidence, keep);
    }
    const check = window.check();
    Object.assign(settling, check);
    const stationary = Math.abs(check.trendZ) < s.settlingTrendZ && Math.abs(check.shift) < s.settlingShift;
    if (!stationary) {
      // A step inside the window leaves it after `settling` samples; a window still rising after that is a ramp.
      settling.risingRun = p.settling.countRising(check.trendZ >= s.settlingTrendZ && check.shift > 0);
      if (p.settling.risingRun >= s.settling) return this.#unsettled("degradation", evidence, keep);
      if (elapsed >= s.settlingLimit) return this.#unsettled(check.trendZ > 0 ? "degradation" : "concept-drift", evidence, keep);
      return this.#step("hold", "concept-drift", evidence, keep);
    }
    const settled = this.#settled(check, evidence);
    return { decision: settled.decision, effects: [...keep, ...settled.effects] };
  }

  /**
   * Settling did not reach a stationary level in time (or kept rising). A
   * broadband change is conditions still moving: settle again, up to four
   * settling limits from the change; otherwise (or after that) alarm.
   */
  #unsettled(cause: Cause, evidence: Evidence, keep: readonly Effect[]): Step {
    const l = this.#ledger;
    const p = this.#parts;
    const signature = this.#episodeSignature(evidence);
    if (p.siteShift.settlesOn(p.settling.start, l.index, 4 * this.settings.settlingLimit)) {
      p.settling.begin(l.index);
      evidence.siteShift = p.siteShift.evidence("the site's change still moving: settling on");
      return this.#step("hold", "concept-drift", evidence, keep);
    }
    if (signature?.broadband === true && p.attribution.episodeSamples < 4 * this.settings.settlingLimit && !p.settling.afterAnomaly) {
      p.settling.begin(l.index);
      evidence.outcome = "a broadband change still moving: settling on";
      return this.#step("hold", "concept-drift", evidence, keep);
    }
    return this.#latch(cause, evidence, true, keep);
  }

  #settled(check: SettlingCheck, evidence: Evidence): Step {
    const s = this.settings;
    const p = this.#parts;
    const l = this.#ledger;
    if (Math.abs(check.activeLevel) < s.confirmShift) {
      // The active reference still scores the stream as normal: the change was not confirmed.
      evidence.outcome = p.settling.afterAnomaly ? "returned to normal" : "unconfirmed";
      l.openAnomaly = null;
      this.#toWatching();
      return this.#step("learn", "normal", evidence, LEARN_ONLY);
    }
    const known = this.#knownMode(check);
    if (known >= 0) return this.#switchTo(known, evidence);
    if (p.degradation.alarmed) {
      // A change on a machine with a degradation alarm behind it is not learnt: it is reported.
      evidence.outcome = "retrain refused: degradation evidence stands";
      return this.#latch("degradation", evidence);
    }
    if (p.degradation.standing) {
      // A degradation warning refuses the retrain as well, without an alarm of its own.
      evidence.outcome = "retrain refused: a degradation warning stands";
      this.#toWatching();
      return this.#step("hold", "degradation", evidence);
    }
    if (p.gate.exhausted(l.index)) {
      evidence.budget = { used: p.gate.used, allowed: s.retrainBudget, horizon: s.retrainHorizon };
      return this.#latch("concept-drift", evidence);
    }
    if (p.gate.coolingDown(l.index)) {
      evidence.coolDown = { until: p.gate.coolDownUntil };
      return this.#step("hold", "concept-drift", evidence);
    }
    if (p.siteShift.covers(p.settling.start) && s.retrain !== "never") {
      // The site shifted as a whole: its new level is the environment's; retrain without asking.
      evidence.siteShift = p.siteShift.evidence("retraining without asking: the site shifted");
      p.siteShift.spend();
      return this.#beginRetrain(evidence);
    }
    // An acknowledged anomaly whose level persisted through settling is not learnt without the operator:
    // a clog acknowledged while it lasts must not become the new normal on its own.
    const exitLevel = p.anomaly.exitLevel(l.liveLevel, s.scoreClip);
    const persisting = p.settling.afterAnomaly && s.persistentAnomaly === "confirm" && check.activeLevel >= exitLevel;
    if (persisting) evidence.persistentAnomaly = { alarmAt: l.anomalyAlarmAt, settledLevel: check.activeLevel, exitLevel };
    if (s.retrain === "never") return this.#latch("concept-drift", evidence);
    const signature = this.#episodeSignature(evidence);
    const faultSignature = signature !== null && signature.determined && !signature.broadband;
    if (s.attendance === "unattended") {
      // Nobody to ask: a change concentrated in a few features (a fault's lines) is reported, any other retrains.
      if (faultSignature || persisting) return this.#latch("anomaly", evidence);
      return this.#beginRetrain(evidence);
    }
    if (persisting && p.gate.silenced(l.index)) {
      evidence.outcome = "held: the operator rejected this level as the new normal";
      return this.#step("hold", "anomaly", evidence);
    }
    if (persisting) {
      p.gate.ask();
      l.alarmLevel = this.#uActive;
      evidence.outcome = "confirmation needed: the level of an acknowledged anomaly persisted through settling";
      return this.#step("await-confirmation", "anomaly", evidence);
    }
    if (faultSignature && !p.settling.afterAnomaly) {
      // A settled change concentrated in a few features may be a fault that holds still: one question, no alarm.
      p.gate.ask();
      l.alarmLevel = this.#uActive;
      evidence.outcome = "confirmation needed: the settled change is concentrated in a few features";
      return this.#step("await-confirmation", "anomaly", evidence);
    }
    if (s.retrain === "confirm") {
      p.gate.ask();
      l.alarmLevel = this.#uActive;
      return this.#step("await-confirmation", "concept-drift", evidence);
    }
    return this.#beginRetrain(evidence);
  }

  /** The reference (commissioning or newest) that scores the settled window as normal, or −1. */
  #knownMode(check: SettlingCheck): number {
    const l = this.#ledger;
    const limit = this.settings.knownModeLevel;
    let best = -1;
    let bestLevel = Infinity;
    if (l.activeId !== 0 && l.levels[0] !== undefined && Math.abs(check.commissioningLevel) < limit) {
      best = 0;
      bestLevel = Math.abs(check.commissioningLevel);
    }
    if (l.activeId !== l.newestId && l.levels[l.newestId] !== undefined && Math.abs(check.newestLevel) < Math.min(limit, bestLevel)) best = l.newestId;
    return best;
  }

  /**
   * Starts a retrain: a score-only host retrains on its side and answers with
   * {@link DecisionCore.modelReplaced}; feature mode carries out the "retrain"
   * effect on the settled samples (outliers left out) and reports back.
   */
  #beginRetrain(evidence: Evidence): Step {
    const p = this.#parts;
    const l = this.#ledger;
    const s = this.settings;
    const window = p.settling.window;
    const check = window.check();
    const limit = check.activeLevel + s.settlingOutlier * Math.max(check.activeSpread, 1e-9);
    const positions = window.positions().filter((at) => window.activeAt(at) <= limit); // an outlier of the settled stream is never learnt
    p.settling.end();
    p.gate.start(l.index);
    l.phase = "retraining";
    const effect: Effect = { kind: "retrain", positions, activeId: l.activeId, newestId: l.newestId, levels: l.levels.map((level) => level ?? null), knownModeLevel: s.knownModeLevel, scoreFloor: s.scoreFloor, scoreClip: s.scoreClip, label: `retrain-${l.retrains + 1}` };
    return this.#step("retrain", "concept-drift", evidence, [effect]);
  }

  /**
   * Concludes a decision from an effect's outcome (feature mode): a refused
   * learn becomes a hold; a retrain attempt becomes a retrain, a switch to an
   * older known mode, or a failed candidate (settle again); a member put in
   * service is reported. Returns the concluded decision and any new effects.
   */
  conclude(decision: Decision, outcome: EffectOutcome): Step {
    const evidence = decision.evidence;
    switch (outcome.kind) {
      case "learn-refused":
        return { decision: { ...decision, action: "hold", evidence: { ...evidence, learning: { refused: true, reason: outcome.reason } } }, effects: NO_EFFECTS };
      case "served":
        return { decision: { ...decision, evidence: { ...evidence, member: outcome.member } }, effects: NO_EFFECTS };
      case "known-mode":
        this.#settleAgain();
        return this.#switchTo(outcome.reference, evidence);
      case "candidate-failed": {
        if (outcome.error !== null) evidence.outcome = `candidate refused: ${outcome.error}`;
        if (outcome.validation !== null) evidence.candidate = outcome.validation;
        this.#settleAgain();
        return { decision: { ...decision, action: "hold", phase: this.#ledger.phase, evidence }, effects: NO_EFFECTS };
      }
      case "adopted":
        evidence.candidate = outcome.validation;
        evidence.member = outcome.member;
        this.modelReplaced();
        return { decision: { ...decision, evidence }, effects: NO_EFFECTS };
    }
  }

  /** The retrain could not be carried out: settle again from this sample. */
  #settleAgain(): void {
    this.#ledger.phase = "settling";
    this.#parts.settling.begin(this.#ledger.index);
  }

  #switchTo(id: number, evidence: Evidence): Step {
    const l = this.#ledger;
    const p = this.#parts;
    if (l.levels[id] === undefined) throw new StateError(this.component, `reference ${id} has no calibrated level`);
    l.activeId = id;
    this.#closeEvents();
    p.change.resetBaseline();
    p.attribution.restartPresent();
    l.switches += 1;
    p.siteShift.spend();
    p.gate.drop();
    p.gate.coolDownFrom(l.index);
    this.#toWatching();
    p.degradation.newLevel();
    evidence.switchedTo = id;
    return this.#step("switch-mode", "known-mode", evidence, [{ kind: "serve", reference: id }]);
  }

  #toWatching(): void {
    this.#ledger.phase = "watching";
    this.#parts.settling.end();
    this.#parts.change.restart();
  }

  #latch(cause: Cause, evidence: Evidence, lasting = true, effects: readonly Effect[] = NO_EFFECTS): Step {
    const l = this.#ledger;
    const p = this.#parts;
    if (cause === "degradation") p.degradation.alarm(lasting);
    const open = this.#openLevel(cause);
    if (open !== null && this.#uActive < open + Math.log(this.settings.realarmFactor)) {
      // The operator has seen this event and it has not worsened by the re-alarm factor: no new page.
      evidence.sameEvent = { cause, level: Math.exp(open), realarmAt: Math.exp(open) * this.settings.realarmFactor };
      p.gate.drop();
      if (l.phase === "settling") this.#toWatching();
      return this.#step("hold", cause, evidence, effects);
    }
    if (cause === "degradation") p.attribution.markDegradation();
    l.phase = "latched";
    l.latchCause = cause;
    l.alarms += 1;
    l.latchedAt = l.index;
    l.latchNormalRun = 0;
    l.alarmLevel = this.#uActive;
    if (cause === "anomaly") l.anomalyAlarmAt = l.index;
    p.gate.drop();
    p.settling.end();
    return this.#step("alarm", cause, evidence, effects);
  }

  /**
   * ln level of the acknowledged, still open event of `cause`, or null. Each
   * cause has its own: an anomaly on a machine whose degradation was
   * acknowledged is a new event unless it is that degradation growing.
   */
  #openLevel(cause: Cause): number | null {
    const l = this.#ledger;
    if (cause === "anomaly") return l.openAnomaly;
    if (cause === "degradation") return l.openDegradation;
    return null;
  }

  /** Every acknowledged event is over (a new reference, a new mode, a new commissioning). */
  #closeEvents(): void {
    this.#ledger.openAnomaly = null;
    this.#ledger.openDegradation = null;
  }

  #step(action: Action, cause: Cause, evidence: Evidence, effects: readonly Effect[] = NO_EFFECTS): Step {
    const notice = this.#parts.siteShift.announce();
    if (notice !== null) evidence.siteShift ??= notice;
    if (cause === "degradation") this.#limitEvidence(evidence);
    return { decision: { index: this.#ledger.index, action, cause, phase: this.#ledger.phase, evidence }, effects };
  }

  /** A degradation decision tells the time to the user's `limit` at the current rate (when one is set). */
  #limitEvidence(evidence: Evidence): void {
    const l = this.#ledger;
    const level = l.levels[l.activeId];
    const limit = level === undefined ? null : this.#parts.degradation.limitEvidence(l.index, level);
    if (limit !== null) evidence.limit = limit;
  }

  #refuse(call: string, allowed: string): never {
    throw new StateError(this.component, `${call}() is allowed only ${allowed}; the engine is ${this.#parts.gate.pending ? "awaiting confirmation" : `in phase "${this.#ledger.phase}"`}`);
  }

  /** The host's new model is in service (answer to a "retrain" decision): calibrate it as the newest reference. */
  modelReplaced(): void {
    const l = this.#ledger;
    if (l.phase !== "retraining") this.#refuse("modelReplaced", 'after a "retrain" decision');
    l.newestId += 1;
    l.activeId = l.newestId;
    this.#closeEvents();
    l.retrains += 1;
    this.#parts.gate.coolDownFrom(l.index);
    l.phase = "watching";
    this.#parts.settling.end();
    this.#beginRecalibration();
  }

  /** Score-only host: the retrain could not be carried out; settle again. */
  retrainFailed(): void {
    if (this.#ledger.phase !== "retraining") this.#refuse("retrainFailed", 'after a "retrain" decision');
    this.#settleAgain();
  }

  #beginRecalibration(): void {
    this.#parts.calibration.begin("recalibration");
    this.#parts.attribution.beginCalibration();
    this.#parts.anomaly.clear();
  }

  /** Operator: go ahead with the retrain the engine awaits confirmation for (it starts with the next sample). */
  confirmRetrain(): void {
    if (!this.#parts.gate.waiting) this.#refuse("confirmRetrain", 'while a retrain awaits confirmation (after "await-confirmation")');
    this.#parts.gate.confirm();
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
    const p = this.#parts;
    const l = this.#ledger;
    const waiting = p.gate.waiting;
    if (!waiting && l.phase !== "retraining") this.#refuse("rejectRetrain", "while a retrain awaits confirmation or is in progress");
    if (waiting && p.settling.afterAnomaly) {
      p.gate.silenceUntil(l.index + 1 + this.settings.settlingLimit);
      p.settling.begin(l.index);
      return;
    }
    p.gate.drop();
    this.#toWatching();
    this.#beginRecalibration();
  }

  /** Operator: clear the alarm latch. An anomaly or degradation stays open as one event until it clears or worsens by `realarmFactor`. */
  acknowledge(): void {
    const l = this.#ledger;
    if (l.phase !== "latched") this.#refuse("acknowledge", "while an alarm is latched");
    if (l.latchCause === "anomaly") l.openAnomaly = l.alarmLevel;
    if (l.latchCause === "degradation") l.openDegradation = l.alarmLevel;
    this.#clearLatch();
  }

  /** Clears the latch (the operator acknowledged, or, unattended, it cleared itself). */
  #clearLatch(): void {
    const l = this.#ledger;
    const p = this.#parts;
    const cause = l.latchCause;
    l.latchCause = null;
    l.latchNormalRun = 0;
    this.#toWatching();
    p.anomaly.clear();
    if (cause === "anomaly") {
      // Whatever follows an acknowledged anomaly settles first: a level that returns to normal is not
      // confirmed, a known mode is switched to, and a level that persists at the anomaly's height waits for
      // the operator's confirmation (persistentAnomaly "confirm"); nothing is learnt meanwhile.
      l.phase = "settling";
      p.settling.begin(l.index, true);
      p.gate.unsilence();
    }
    if (cause === "degradation") p.degradation.keepStanding();
    if (cause === "concept-drift") {
      // An unexplained change the operator has seen: accept its level without retraining.
      p.degradation.restartTrends();
      this.#beginRecalibration();
    }
  }

  /** Operator: start a commissioning window of `n` samples; afterwards a new commissioning reference is frozen and everything is calibrated again. */
  startCommissioning(n: number): void {
    const l = this.#ledger;
    const p = this.#parts;
    if (l.phase === "commissioning") this.#refuse("startCommissioning", "outside commissioning");
    l.phase = "commissioning";
    l.latchCause = null;
    this.#closeEvents();
    l.latchedAt = -1;
    l.commissioningLength = n;
    l.commissioningLeft = n;
    l.levels = [];
    l.liveLevel = null;
    l.activeId = 0;
    l.newestId = 0;
    p.calibration.cancel();
    p.anomaly.forget();
    p.change.forget();
    p.degradation.recommission();
    p.attribution.forget();
    p.gate.drop();
    p.gate.unsilence();
    p.settling.end();
    p.siteShift.forget();
  }

  /** A degradation warning or alarm of this machine stands (a site shift never covers it). */
  #degrading(): boolean {
    return this.#parts.degradation.standing || this.#parts.degradation.alarmed;
  }

  /**
   * Operator: the site shifted as a whole ({@link SiteShiftNotice}): the
   * change under way, or the next change onset within `settlingLimit`
   * samples, is concept drift; an anomaly latch of that change clears into
   * settling. Declined (noted in the next decision's evidence) while a
   * degradation warning or alarm stands.
   */
  reportSiteShift(): void {
    const l = this.#ledger;
    const p = this.#parts;
    const situation = { index: l.index, phase: l.phase, settlingStart: p.settling.start, latchCause: l.latchCause, anomalyAlarmAt: l.anomalyAlarmAt, degrading: this.#degrading() };
    if (p.siteShift.report(situation, this.settings.settlingLimit) !== "clear-latch") return;
    l.latchCause = null;
    l.latchNormalRun = 0;
    this.#toWatching();
    p.anomaly.clear();
    l.phase = "settling";
    p.settling.begin(l.index, false);
  }
}

