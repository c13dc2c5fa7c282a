import { finiteArray, integerInRange, nonNegativeInteger, numberInRange, optionsObject } from "@leeway/core";
import { ChangePointPosterior, POSTERIOR_MAX_HYPOTHESES } from "@leeway/change";

/** Options of {@link changeOnset}. */
export interface ChangeOnsetOptions {
  /** Stream index of `values[0]` (default 0). */
  firstIndex?: number;
  /** Prior level μ₀ of a segment, on the values' scale (default 0: normalised scores, in σ). */
  mean?: number;
  /** Prior noise σ₀ within a segment, on the values' scale (> 0, default 1). */
  sigma?: number;
  /** Expected samples between changes (> 1, default 1000): the hazard is its inverse. */
  expectedRunLength?: number;
  /** Run-length hypotheses kept (an integer in [2, 4096], default 256). */
  maxHypotheses?: number;
  /** Posterior mass of the onset interval, in (0, 1) (default 0.9). */
  credibility?: number;
}

/** Where the latest segment of a window most probably began. */
export interface ChangeOnset {
  /**
   * The most probable stream index at which the latest segment began, or null
   * when the most probable segment spans the whole window (no change in it).
   */
  onset: number | null;
  /** The most probable length of the latest segment, in samples (the last value included). */
  runLength: number;
  /** Posterior probability of exactly that run length. */
  probability: number;
  /** The shortest span of onsets holding `credibility` of the posterior mass, as stream indices. */
  earliest: number;
  latest: number;
  /** Posterior mean level of the latest segment under the most probable run length, on the values' scale. */
  level: number;
}

const NAME = "changeOnset";
const KNOWN = ["firstIndex", "mean", "sigma", "expectedRunLength", "maxHypotheses", "credibility"] as const;

/**
 * The most probable onset of the latest change in a window of samples, for
 * placing the start of settling where the level actually moved rather than
 * where a change test fired. Method: Bayesian online change-point detection
 * (Adams & MacKay, 2007) with a Normal-Gamma prior on the values' own scale
 * ({@link ChangePointPosterior}, linear scale) run over the window; the
 * answer is the posterior mode of the current run length after the last value
 * and the highest-posterior span of onsets. Pure: the same window gives the
 * same answer. Cost O(window × maxHypotheses).
 * @example
 * // normalised scores: in control for 300 samples, then 2 σ higher; the window starts at sample 5000
 * const z = Float64Array.from({ length: 400 }, (_, i) => (i < 300 ? 0 : 2) + Math.sin(i * 1.7) * 0.8);
 * const o = changeOnset(z, { firstIndex: 5000 });
 * [o.onset, o.runLength]; // [5300, 100]
 */
export function changeOnset(values: ArrayLike<number>, options: ChangeOnsetOptions = {}): ChangeOnset {
  const o = optionsObject<ChangeOnsetOptions>(NAME, options, KNOWN);
  const xs = finiteArray(NAME, "values", values, { atLeast: 1 });
  const firstIndex = o.firstIndex === undefined ? 0 : nonNegativeInteger(NAME, "firstIndex", o.firstIndex, Number.MAX_SAFE_INTEGER);
  const credibility = o.credibility === undefined ? 0.9 : numberInRange(NAME, "credibility", o.credibility, { min: 0, max: 1, minExclusive: true, maxExclusive: true });
  const posterior = new ChangePointPosterior({
    scale: "linear",
    mean: o.mean ?? 0,
    sigma: o.sigma ?? 1,
    expectedRunLength: o.expectedRunLength ?? 1000,
    maxHypotheses: o.maxHypotheses === undefined ? 256 : integerInRange(NAME, "maxHypotheses", o.maxHypotheses, 2, POSTERIOR_MAX_HYPOTHESES),
  });
  let reading = posterior.observe(xs[0] as number);
  for (let i = 1; i < xs.length; i++) reading = posterior.observe(xs[i] as number);
  const last = firstIndex + xs.length - 1;
  const { lengths, probabilities } = posterior.runLengths();
  const span = credibleSpan(lengths, probabilities, credibility);
  const best = lengths.indexOf(reading.runLength);
  return {
    onset: reading.runLength >= xs.length ? null : last - reading.runLength + 1,
    runLength: reading.runLength,
    probability: probabilities[best] ?? 0,
    earliest: last - span.longest + 1,
    latest: last - span.shortest + 1,
    level: reading.level as number,
  };
}

/**
 * The shortest contiguous range of run lengths holding `mass` of the posterior
 * (a highest-density interval over the kept hypotheses, two pointers).
 */
function credibleSpan(lengths: number[], probabilities: number[], mass: number): { shortest: number; longest: number } {
  const order = lengths.map((_, k) => k).sort((a, b) => (lengths[a] as number) - (lengths[b] as number));
  const L = order.map((k) => lengths[k] as number);
  const P = order.map((k) => probabilities[k] as number);
  let best = { shortest: L[0] as number, longest: L[L.length - 1] as number };
  let sum = 0;
  let lo = 0;
  for (let hi = 0; hi < L.length; hi++) {
    sum += P[hi] as number;
    while (lo < hi && sum - (P[lo] as number) >= mass) sum -= P[lo++] as number;
    if (sum >= mass && (L[hi] as number) - (L[lo] as number) < best.longest - best.shortest) best = { shortest: L[lo] as number, longest: L[hi] as number };
  }
  return best;
}
