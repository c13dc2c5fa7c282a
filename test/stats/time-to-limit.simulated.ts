import { defineScenario, MachineSimulator } from "@leeway/sim";
import { timeToLimit } from "@leeway/stats";

/** What {@link simulatedCrossingCoverage} measured. */
export interface CrossingCoverage {
  /** Streams whose window gave an estimate. */
  estimated: number;
  /** Streams whose window was refused or read as already past the limit. */
  notEstimated: number;
  /** Estimates whose interval held the true crossing. */
  covered: number;
  /** covered / estimated. */
  coverage: number;
  /** The limit set, mm/s², and the true crossing index. */
  limit: number;
  trueCrossing: number;
  /** Median of expected − true crossing over the estimates, in samples. */
  medianError: number;
}

/** Bands 8–10 (78–107 Hz) of the simulator's 256 bands of 9.77 Hz hold the outer-race line of PS-2 at 1485 rpm (BPFO ≈ 88.7 Hz). */
const FIRST_BAND = 8;
const LAST_BAND = 10;

/** Settings of the coverage run; the defaults are the long run's. */
export interface CoverageSettings {
  /** Streams whose windows are checked (seeds 1 … streams). */
  streams: number;
  /** Streams averaged for the true mean trajectory (seeds 100 001 …), disjoint from the checked ones. */
  truthStreams: number;
  confidence?: number;
}

const HEALTHY = 100; // samples before the wear starts: the healthy band power P₀ is their mean
const WINDOW_START = 250;
const WINDOW_END = 350; // exclusive: the estimate is made after sample 349
const TRUE_CROSSING = 500; // the limit is the mean feature at this sample
const WEAR_SAMPLES = 1000; // severity grows linearly from 0.001 to 1 over this many samples

/**
 * The drive-end bearing of PS-2 wears linearly from sample 100 (outer race, amplitude 0.4 m/s²
 * at full severity, 1000 samples later). The feature is the excess RMS acceleration of bands
 * 8–10 over the healthy stream, in mm/s²: √max(0, P − P₀), P = Σ (expm1(v_b)·1 mm/s²)² the band
 * power and P₀ its mean over the stream's first 100 (healthy) samples; the line's power grows as
 * severity², so the excess RMS grows linearly. The limit L is the mean feature at sample 500, its mean over
 * `truthStreams` other seeds smoothed by a least-squares line over samples 450–549; each checked
 * stream estimates, from its samples 250–349, when it reaches L; the truth is 500 − 349 samples ahead.
 */
export function simulatedCrossingCoverage(settings: CoverageSettings): CrossingCoverage {
  const confidence = settings.confidence ?? 0.9;
  const limit = meanFeatureAt(TRUE_CROSSING, settings.truthStreams);
  const ahead = TRUE_CROSSING - (WINDOW_END - 1);
  let estimated = 0;
  let covered = 0;
  const errors: number[] = [];
  for (let seed = 1; seed <= settings.streams; seed++) {
    const feature = bearingFeature(seed, WINDOW_END);
    const t = timeToLimit(feature.subarray(WINDOW_START, WINDOW_END), { limit, confidence });
    if (t.status !== "estimated") continue;
    estimated++;
    if (t.earliest <= ahead && ahead <= t.latest) covered++;
    errors.push(t.expected - ahead);
  }
  errors.sort((a, b) => a - b);
  return {
    estimated,
    notEstimated: settings.streams - estimated,
    covered,
    coverage: covered / estimated,
    limit,
    trueCrossing: TRUE_CROSSING,
    medianError: errors.length === 0 ? Number.NaN : (errors[errors.length >> 1] as number),
  };
}

/** The feature of one simulated stream, samples 0 … length − 1 (length > 100). */
export function bearingFeature(seed: number, length: number): Float64Array {
  const sim = new MachineSimulator(
    defineScenario({
      name: "ps2-bearing-wear",
      length: HEALTHY + WEAR_SAMPLES,
      seed,
      schedule: [{ start: 0, mode: "mid", rpm: 1485 }],
      events: [{ type: "degradation", start: HEALTHY, end: HEALTHY + WEAR_SAMPLES, growth: "linear", amplitude: 0.4, defect: "outer-race", label: "drive-end outer race wears" }],
    }),
  );
  const power = new Float64Array(length);
  for (let i = 0; i < length; i++) {
    const s = sim.next();
    if (s === undefined || s === null) throw new Error("the scenario ended early");
    let p = 0;
    for (let b = FIRST_BAND; b <= LAST_BAND; b++) {
      const a = Math.expm1(s.spectrum[b] as number); // band RMS in units of 1 mm/s²
      p += a * a;
    }
    power[i] = p;
  }
  let healthy = 0;
  for (let i = 0; i < HEALTHY; i++) healthy += (power[i] as number) / HEALTHY;
  return power.map((p) => Math.sqrt(Math.max(0, p - healthy)));
}

/** The mean feature at sample `at`: the average over `streams` seeds, smoothed by a line over at ± 50. */
function meanFeatureAt(at: number, streams: number): number {
  const from = at - 50;
  const to = at + 50; // exclusive
  const mean = new Float64Array(to - from);
  for (let k = 0; k < streams; k++) {
    const f = bearingFeature(100_001 + k, to);
    for (let i = from; i < to; i++) mean[i - from] = (mean[i - from] as number) + (f[i] as number) / streams;
  }
  // least-squares line through (i, mean_i), evaluated at `at`
  const m = mean.length;
  const tc = (m - 1) / 2;
  let sy = 0;
  let sty = 0;
  let stt = 0;
  for (let i = 0; i < m; i++) {
    sy += mean[i] as number;
    sty += (i - tc) * (mean[i] as number);
    stt += (i - tc) * (i - tc);
  }
  return sy / m + (sty / stt) * (at - from - tc);
}
