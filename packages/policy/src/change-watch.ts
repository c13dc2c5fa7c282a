import { envelope, openSnapshot, StateError, type Snapshot } from "@leeway/core";
import { gaussianThreshold, restoreChangeTest, type ChangeReading, type ChangeTest } from "@leeway/change";
import type { ChangeTestChoice } from "./options.js";
import { calibratedThreshold, makeChangeTest } from "./change-factory.js";
import { OnsetWindow, type OnsetEvidence } from "./onset-window.js";

/** The settings the change rule reads. */
export interface ChangeWatchSettings {
  changeTest: ChangeTestChoice;
  targetArl0: number;
  calibrationReplicates: number;
  baselineHalfLife: number;
  /** The martingale's λ (changeTest "martingale" only). */
  martingaleThreshold: number;
  /** Normalised scores are clipped to ± this (σ). */
  scoreClip: number;
}

/** The plain state of a {@link ChangeWatch}. */
export interface ChangeWatchState {
  threshold: number | null;
  test: Snapshot | null;
  baseline: number;
  /** The latest normalised scores tested, oldest first (at most ONSET_WINDOW). */
  recent: number[];
}

/** What the change rule puts in a decision's evidence. */
export interface ChangeEvidence {
  test: string;
  statistic: number;
  threshold: number;
  status: ChangeReading["status"];
  direction: "up" | "down" | null;
}

/**
 * The concept-drift rule: a two-sided change test on the active reference's
 * normalised score z, measured from a slowly following baseline
 * b ← b + α(z − b), α = 1 − 2^(−1/halfLife), which removes the error of the
 * calibrated mean (a few hundred samples leave it uncertain by ~0.1 σ, enough
 * to shorten a CUSUM's in-control run length severalfold) and leaves slow
 * trends to the degradation rule. The threshold is calibrated once per
 * commissioning to the target in-control ARL by block bootstrap. The latest
 * scores tested are kept ({@link OnsetWindow}) so that a confirmed change can
 * be placed where the level moved.
 * @example
 * const w = new ChangeWatch({ changeTest: "cusum", targetArl0: 500, calibrationReplicates: 10, baselineHalfLife: 100, martingaleThreshold: 100, scoreClip: 6 });
 * w.arm(Float64Array.from({ length: 200 }, (_, i) => Math.sin(i)), "seed", true);
 * let status = "stable";
 * for (let i = 0; i < 50 && status !== "change"; i++) status = w.observe(3).status;
 * status; // "change"
 */
export class ChangeWatch {
  static readonly kind = "leeway.policy.change-watch";
  static readonly version = 2;
  readonly #s: ChangeWatchSettings;
  readonly #alpha: number;
  #threshold: number | null = null;
  #test: ChangeTest | null = null;
  #baseline = 0; // b, in σ
  #recent = new OnsetWindow();

  constructor(settings: ChangeWatchSettings) {
    this.#s = settings;
    this.#alpha = 1 - 2 ** (-1 / settings.baselineHalfLife);
  }

  /** The calibrated threshold, or null before the first calibration. */
  get threshold(): number | null {
    return this.#threshold;
  }
  /** True once a test runs. */
  get armed(): boolean {
    return this.#test !== null;
  }

  /**
   * Starts a fresh test at baseline 0. The threshold is calibrated on the
   * normalised calibration scores `z` when `recalibrate` is true or none exists
   * yet. Returns why it fell back to the white-noise threshold (scores without
   * variation give the bootstrap nothing to calibrate on), or null.
   */
  arm(z: Float64Array, seed: string, recalibrate: boolean): string | null {
    let fallback: string | null = null;
    if (recalibrate || this.#threshold === null) {
      const s = this.#s;
      try {
        this.#threshold = calibratedThreshold(s.changeTest, z, s.targetArl0, s.calibrationReplicates, seed, s.martingaleThreshold);
      } catch (error) {
        if (!(error instanceof StateError)) throw error;
        this.#threshold = gaussianThreshold(s.targetArl0);
        fallback = error.message;
      }
    }
    this.#test = makeChangeTest(this.#s.changeTest, this.#threshold);
    this.#baseline = 0;
    this.#recent.clear();
    return fallback;
  }

  /** Feeds z − b to the test, then moves the baseline toward z. */
  observe(zActive: number): ChangeReading {
    this.#recent.push(zActive);
    const reading = (this.#test as ChangeTest).observe(zActive - this.#baseline);
    this.#baseline += this.#alpha * (zActive - this.#baseline);
    return reading;
  }

  /** The evidence of a reading. */
  evidence(reading: ChangeReading): ChangeEvidence {
    return { test: (this.#test as ChangeTest).name, statistic: reading.statistic, threshold: reading.threshold, status: reading.status, direction: reading.direction ?? null };
  }

  /**
   * Where the change that fired at sample `index` (the latest observed) most
   * probably began: the change-point posterior over the kept scores.
   */
  onset(index: number): OnsetEvidence {
    return this.#recent.onset(index);
  }

  /** Restarts the test (after it fired, or a new watching span). */
  restart(): void {
    this.#test?.restart();
  }

  /** Moves the baseline back to the calibrated level (a switch to another reference). */
  resetBaseline(): void {
    this.#baseline = 0;
    this.#recent.clear(); // the kept scores were measured against the other reference
  }

  /** Forgets test and threshold (a new commissioning). */
  forget(): void {
    this.#test = null;
    this.#threshold = null;
    this.#recent.clear();
  }

  snapshot(): Snapshot<ChangeWatchState> {
    return envelope(ChangeWatch.kind, ChangeWatch.version, { threshold: this.#threshold, test: this.#test === null ? null : this.#test.snapshot(), baseline: this.#baseline, recent: this.#recent.plain() });
  }

  static restore(snapshot: unknown, settings: ChangeWatchSettings): ChangeWatch {
    const r = openSnapshot(snapshot, ChangeWatch.kind, ChangeWatch.version);
    const threshold = r.numberOrNull("threshold");
    if (threshold !== null && !(threshold > 0)) r.fail("threshold", `must be > 0 or null, got ${threshold}`);
    const test = r.raw("test") === null ? null : restoreChangeTest(r.raw("test"));
    if (test !== null && threshold === null) r.fail("threshold", "must be set while a test runs");
    const baseline = r.number("baseline");
    const recent = OnsetWindow.read(r, "recent", settings.scoreClip);
    const w = new ChangeWatch(settings);
    w.#threshold = threshold;
    w.#test = test;
    w.#baseline = baseline;
    w.#recent = recent;
    return w;
  }
}
