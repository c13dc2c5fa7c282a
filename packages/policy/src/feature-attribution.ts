import { envelope, openSnapshot, toPlainArray, type Snapshot, type SnapshotReader } from "@leeway/core";
import { signatureOf, type FeatureSignature, type SignatureLimits } from "./feature-signature.js";

/** The plain state of a {@link FeatureAttribution}. */
export interface FeatureAttributionState {
  features: number;
  /** Per lineage id; both arrays empty for a reference without a baseline. */
  baselines: { mean: number[]; variance: number[] }[];
  calibrationSum: number[];
  calibrationSquares: number[];
  calibrationCount: number;
  present: number[];
  presentWeight: number;
  presentWeightSquares: number;
  episode: number[];
  episodeCount: number;
  /** The present mean shift when the standing degradation alarmed (empty when none was marked). */
  degradationShift: number[];
}

/**
 * Which input features carry a deviation: per sample the active reference's
 * signed residual r_j (input minus reconstruction) is compared with its mean
 * and variance over that reference's calibration span; the shift
 * δ_j = r_j − mean_j is averaged over an episode (from its first sample) and,
 * exponentially weighted, over the present (half-life `halfLife` samples).
 * {@link signatureOf} turns either mean into shares and a shape.
 * Without residuals (score-only mode) every signature is null.
 * @example
 * const a = new FeatureAttribution(100);
 * a.beginCalibration();
 * for (let i = 0; i < 50; i++) { a.observe(Float64Array.from({ length: 16 }, (_, j) => Math.sin(i * 7 + j)), 0); a.calibrate(); }
 * a.finishCalibration(0);
 * a.observe(new Float64Array(16).fill(3), 0);
 * a.beginEpisode();
 * a.episode(0, { minSpread: 0.3, maxLocality: 0.5, minStrength: 4 })?.broadband; // true
 */
export class FeatureAttribution {
  static readonly kind = "leeway.policy.feature-attribution";
  static readonly version = 2;
  readonly #alpha: number;
  #n = 0;
  #baselines: ({ mean: Float64Array; variance: Float64Array } | null)[] = [];
  #calSum: Float64Array = new Float64Array(0);
  #calSquares: Float64Array = new Float64Array(0);
  #calCount = 0;
  #present: Float64Array = new Float64Array(0);
  #presentWeight = 0; // Σw of the exponential weights, for the effective sample count (Σw)²/Σw²
  #presentWeightSquares = 0;
  #episode: Float64Array = new Float64Array(0);
  #episodeCount = 0;
  #degradationShift: Float64Array = new Float64Array(0); // the present mean when the degradation alarmed
  #hasDegradation = false;
  // The sample being decided (not part of the state between samples).
  #raw = new Float64Array(0);
  #deviation = new Float64Array(0);
  #mean = new Float64Array(0); // scratch for a signature's mean shift
  #hasRaw = false;
  #hasDeviation = false;

  constructor(halfLife: number) {
    this.#alpha = 1 - 2 ** (-1 / Math.max(1, halfLife));
  }

  /** Number of features (0 until a residual was seen). */
  get features(): number {
    return this.#n;
  }

  /**
   * Takes the sample's residual under the active reference (or none) and,
   * when that reference has a baseline, its shift into the present mean.
   */
  observe(residual: Float64Array | undefined, activeId: number): void {
    this.#hasRaw = residual !== undefined && withinRange(residual);
    this.#hasDeviation = false;
    if (residual === undefined || !this.#hasRaw) return;
    if (this.#n === 0) this.#size(residual.length);
    this.#raw.set(residual);
    const base = this.#baselines[activeId] ?? null;
    if (base === null) return;
    const a = this.#alpha;
    for (let j = 0; j < this.#n; j++) {
      const d = (residual[j] as number) - (base.mean[j] as number);
      this.#deviation[j] = d;
      this.#present[j] = (1 - a) * (this.#present[j] as number) + a * d;
    }
    this.#presentWeight = (1 - a) * this.#presentWeight + a;
    this.#presentWeightSquares = (1 - a) * (1 - a) * this.#presentWeightSquares + a * a;
    this.#hasDeviation = true;
  }

  #size(n: number): void {
    this.#n = n;
    this.#calSum = new Float64Array(n);
    this.#calSquares = new Float64Array(n);
    this.#present = new Float64Array(n);
    this.#episode = new Float64Array(n);
    this.#degradationShift = new Float64Array(n);
    this.#raw = new Float64Array(n);
    this.#deviation = new Float64Array(n);
    this.#mean = new Float64Array(n);
  }

  /** Lineage ids with a baseline entry (every calibrated reference once residuals arrive). */
  get baselineCount(): number {
    return this.#baselines.length;
  }

  /** Samples in the present episode. */
  get episodeSamples(): number {
    return this.#episodeCount;
  }

  /** Starts collecting a reference's baseline. */
  beginCalibration(): void {
    this.#calSum.fill(0);
    this.#calSquares.fill(0);
    this.#calCount = 0;
  }

  /** Adds the sample's residual to the baseline being collected. */
  calibrate(): void {
    if (!this.#hasRaw) return;
    for (let j = 0; j < this.#n; j++) {
      const r = this.#raw[j] as number;
      this.#calSum[j] = (this.#calSum[j] as number) + r;
      this.#calSquares[j] = (this.#calSquares[j] as number) + r * r;
    }
    this.#calCount += 1;
  }

  /** The collected span becomes reference `id`'s baseline; the present mean starts again. */
  finishCalibration(id: number): void {
    const count = this.#calCount;
    while (this.#baselines.length <= id) this.#baselines.push(null);
    this.#baselines[id] = null;
    if (count >= 2) {
      const mean = new Float64Array(this.#n);
      const variance = new Float64Array(this.#n);
      for (let j = 0; j < this.#n; j++) {
        const m = (this.#calSum[j] as number) / count;
        mean[j] = m;
        variance[j] = Math.max(0, ((this.#calSquares[j] as number) - count * m * m) / (count - 1));
      }
      this.#baselines[id] = { mean, variance };
    }
    this.beginCalibration();
    this.restartPresent();
  }

  /** Forgets the present mean (a new reference or mode is watched). */
  restartPresent(): void {
    this.#present.fill(0);
    this.#presentWeight = 0;
    this.#presentWeightSquares = 0;
    this.#degradationShift.fill(0);
    this.#hasDegradation = false;
  }

  /** A degradation alarm: its direction is the present mean shift (none without one). */
  markDegradation(): void {
    this.#hasDegradation = this.#presentWeight > 0;
    if (this.#hasDegradation) this.#degradationShift.set(this.#present);
  }

  /** Starts an episode with the sample being decided. */
  beginEpisode(): void {
    this.#episode.fill(0);
    this.#episodeCount = 0;
    this.extendEpisode();
  }

  /** Adds the sample being decided to the episode. */
  extendEpisode(): void {
    if (!this.#hasDeviation) return;
    for (let j = 0; j < this.#n; j++) this.#episode[j] = (this.#episode[j] as number) + (this.#deviation[j] as number);
    this.#episodeCount += 1;
  }

  /** The episode's signature under reference `activeId`, or null without residuals or a baseline. */
  episode(activeId: number, limits: SignatureLimits): FeatureSignature | null {
    const base = this.#baselines[activeId] ?? null;
    if (base === null || this.#episodeCount === 0) return null;
    return signatureOf(this.#meanOf(this.#episode, this.#episodeCount), base.variance, this.#episodeCount, limits);
  }

  /** The present (exponentially weighted) signature under reference `activeId`, or null. */
  present(activeId: number, limits: SignatureLimits): FeatureSignature | null {
    const base = this.#baselines[activeId] ?? null;
    if (base === null || this.#presentWeight === 0) return null;
    const samples = (this.#presentWeight * this.#presentWeight) / this.#presentWeightSquares;
    return signatureOf(this.#meanOf(this.#present, this.#presentWeight), base.variance, samples, limits);
  }

  /**
   * How far the episode points the way the degradation did when it alarmed
   * ({@link FeatureAttribution.markDegradation}): the cosine of the two mean
   * shifts, each feature scaled by its calibration spread (1: the same
   * features in the same proportions, 0: unrelated). Wear growing past the
   * anomaly threshold keeps its direction; a new fault on other features
   * turns it. Null without a baseline, an episode or a marked degradation.
   */
  agreement(activeId: number): number | null {
    const base = this.#baselines[activeId] ?? null;
    if (base === null || this.#episodeCount === 0 || !this.#hasDegradation) return null;
    let dot = 0;
    let episodeNorm = 0;
    let beforeNorm = 0;
    for (let j = 0; j < this.#n; j++) {
      const v = base.variance[j] as number;
      if (!(v > 0)) continue;
      const e = (this.#episode[j] as number) / this.#episodeCount;
      const b = this.#degradationShift[j] as number;
      dot += (e * b) / v;
      episodeNorm += (e * e) / v;
      beforeNorm += (b * b) / v;
    }
    if (!(episodeNorm > 0 && beforeNorm > 0)) return null;
    return dot / Math.sqrt(episodeNorm * beforeNorm);
  }

  /** sums / weight into the scratch buffer (no allocation while a warning is judged every sample). */
  #meanOf(sums: Float64Array, weight: number): Float64Array {
    for (let j = 0; j < this.#n; j++) this.#mean[j] = (sums[j] as number) / weight;
    return this.#mean;
  }

  /** A new commissioning: every baseline is forgotten. */
  forget(): void {
    this.#baselines = [];
    this.beginCalibration();
    this.restartPresent();
    this.#episode.fill(0);
    this.#episodeCount = 0;
  }

  snapshot(): Snapshot<FeatureAttributionState> {
    return envelope(FeatureAttribution.kind, FeatureAttribution.version, {
      features: this.#n,
      baselines: this.#baselines.map((b) => (b === null ? { mean: [], variance: [] } : { mean: toPlainArray(b.mean), variance: toPlainArray(b.variance) })),
      calibrationSum: toPlainArray(this.#calSum),
      calibrationSquares: toPlainArray(this.#calSquares),
      calibrationCount: this.#calCount,
      present: toPlainArray(this.#present),
      presentWeight: this.#presentWeight,
      presentWeightSquares: this.#presentWeightSquares,
      episode: toPlainArray(this.#episode),
      episodeCount: this.#episodeCount,
      degradationShift: this.#hasDegradation ? toPlainArray(this.#degradationShift) : [],
    });
  }

  /** Rebuilds an attribution; `halfLife` and `references` (the most lineage ids) come from the core. */
  static restore(snapshot: unknown, halfLife: number, references: number): FeatureAttribution {
    const r = openSnapshot(snapshot, FeatureAttribution.kind, FeatureAttribution.version);
    const n = r.integer("features", 0, 1 << 20);
    const a = new FeatureAttribution(halfLife);
    a.#size(n);
    a.#baselines = r.objects("baselines", { max: references }).map((b) => readBaseline(b, n));
    a.#calSum = r.numbers("calibrationSum", n);
    a.#calSquares = r.numbers("calibrationSquares", n);
    a.#calCount = r.integer("calibrationCount", 0, Number.MAX_SAFE_INTEGER);
    a.#present = r.numbers("present", n);
    a.#presentWeight = r.numberIn("presentWeight", 0, 1);
    a.#presentWeightSquares = r.numberIn("presentWeightSquares", 0, 1);
    if ((a.#presentWeight === 0) !== (a.#presentWeightSquares === 0)) r.fail("presentWeightSquares", "must be 0 exactly when presentWeight is 0");
    a.#episode = r.numbers("episode", n);
    a.#episodeCount = r.integer("episodeCount", 0, Number.MAX_SAFE_INTEGER);
    const shift = r.numbers("degradationShift", { max: n });
    if (shift.length !== 0 && shift.length !== n) r.fail("degradationShift", `must have length 0 or ${n}, got length ${shift.length}`);
    a.#hasDegradation = shift.length === n && n > 0;
    if (a.#hasDegradation) a.#degradationShift = shift;
    return a;
  }
}

function readBaseline(b: SnapshotReader, n: number): { mean: Float64Array; variance: Float64Array } | null {
  const mean = b.numbers("mean", { max: n });
  if (mean.length === 0) {
    b.numbers("variance", 0);
    return null;
  }
  if (mean.length !== n) b.fail("mean", `must have length 0 or ${n}, got length ${mean.length}`);
  const variance = b.numbers("variance", n);
  for (const v of variance) if (!(v >= 0)) b.fail("variance", `must hold numbers >= 0, got ${v}`);
  return { mean, variance };
}

/** Half-life in samples of the present feature signature: half the settling span. */
export function signatureHalfLife(settings: { settling: number }): number {
  return Math.max(1, Math.round(settings.settling / 2));
}

/** Residuals beyond this (in scaled units) are left out: their squares could overflow the sums. */
const RESIDUAL_LIMIT = 1e100;

function withinRange(residual: Float64Array): boolean {
  for (let j = 0; j < residual.length; j++) if (!(Math.abs(residual[j] as number) <= RESIDUAL_LIMIT)) return false;
  return true;
}
