import { envelope, openSnapshot, toPlainArray, type Snapshot } from "@leeway/core";
import { levelOf, normalised, quantileOf, type ScoreLevel } from "./calibration.js";

/** What a calibration span is for: the first after commissioning (it also calibrates the change threshold), or one after a retrain or an accepted level. */
export type CalibrationPurpose = "commissioning" | "recalibration";

/** The plain state of a {@link CalibrationSpan}. */
export interface CalibrationSpanState {
  purpose: CalibrationPurpose | null;
  filled: number;
  live: number[];
  active: number[];
}

/** What a finished span measured. */
export interface CalibrationResult {
  purpose: CalibrationPurpose;
  /** μ and σ of the active reference's log scores. */
  active: ScoreLevel;
  /** μ and σ of the live model's log scores. */
  live: ScoreLevel;
  /** The anomaly quantile of the live log scores. */
  liveQuantile: number;
  /** The active reference's scores normalised by `active` and clipped (for the change threshold). */
  activeZ: Float64Array;
}

/**
 * The calibration rule: after a reference is frozen (or a level accepted),
 * the next `length` samples' log scores u = ln(s + floor) of the live model
 * and the active reference are kept; their means, spreads and the live
 * scores' anomaly quantile become the normal levels and thresholds.
 * @example
 * const c = new CalibrationSpan(4);
 * c.begin("commissioning");
 * for (const u of [0, 1, 0, 1]) c.push(u, u);
 * c.finish(0.5, 6).active.mean; // 0.5
 */
export class CalibrationSpan {
  static readonly kind = "leeway.policy.calibration-span";
  static readonly version = 1;
  readonly #length: number;
  #purpose: CalibrationPurpose | null = null;
  #filled = 0;
  readonly #live: Float64Array;
  readonly #active: Float64Array;

  constructor(length: number) {
    this.#length = length;
    this.#live = new Float64Array(length);
    this.#active = new Float64Array(length);
  }

  /** What the running span is for, or null when none runs. */
  get purpose(): CalibrationPurpose | null {
    return this.#purpose;
  }
  /** Share of the span filled, in (0, 1] after a push. */
  get progress(): number {
    return this.#filled / this.#length;
  }
  /** True when the span is full and waits for {@link CalibrationSpan.finish}. */
  get full(): boolean {
    return this.#filled === this.#length;
  }

  begin(purpose: CalibrationPurpose): void {
    this.#purpose = purpose;
    this.#filled = 0;
  }

  /** Stops without a result (a new commissioning). */
  cancel(): void {
    this.#purpose = null;
    this.#filled = 0;
  }

  /** Keeps one sample's log scores. */
  push(uLive: number, uActive: number): void {
    this.#live[this.#filled] = uLive;
    this.#active[this.#filled] = uActive;
    this.#filled += 1;
  }

  /** Measures the full span and ends it. */
  finish(anomalyQuantile: number, clip: number): CalibrationResult {
    const n = this.#length;
    const active = levelOf(this.#active, n);
    const live = levelOf(this.#live, n);
    const liveQuantile = quantileOf(this.#live, anomalyQuantile, n);
    const activeZ = new Float64Array(n);
    for (let i = 0; i < n; i++) activeZ[i] = normalised(this.#active[i] as number, active, clip);
    const purpose = this.#purpose as CalibrationPurpose;
    this.#purpose = null;
    this.#filled = 0;
    return { purpose, active, live, liveQuantile, activeZ };
  }

  snapshot(): Snapshot<CalibrationSpanState> {
    return envelope(CalibrationSpan.kind, CalibrationSpan.version, { purpose: this.#purpose, filled: this.#filled, live: toPlainArray(this.#live), active: toPlainArray(this.#active) });
  }

  static restore(snapshot: unknown, length: number): CalibrationSpan {
    const r = openSnapshot(snapshot, CalibrationSpan.kind, CalibrationSpan.version);
    const purposeRaw = r.stringOrNull("purpose");
    if (purposeRaw !== null && purposeRaw !== "commissioning" && purposeRaw !== "recalibration") r.fail("purpose", `must be "commissioning", "recalibration" or null, got ${JSON.stringify(purposeRaw)}`);
    const filled = r.integer("filled", 0, length - 1);
    if (purposeRaw === null && filled !== 0) r.fail("filled", `must be 0 while no span runs, got ${filled}`);
    const live = r.numbers("live", length);
    const active = r.numbers("active", length);
    const c = new CalibrationSpan(length);
    c.#purpose = purposeRaw as CalibrationPurpose | null;
    c.#filled = filled;
    c.#live.set(live);
    c.#active.set(active);
    return c;
  }
}
