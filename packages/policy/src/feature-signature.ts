/**
 * How a deviation from normal lies across the input features, measured from
 * the mean shift δ_j of each feature's signed reconstruction residual.
 *
 * Energy per feature: e_j = max(0, δ_j² − v_j/k), the squared shift less
 * the part noise alone would give (v_j the residual's variance in
 * calibration, k the effective number of samples averaged). Shares are
 * e_j / Σe. Two measures of where the energy lies:
 * - spread: the participation ratio (Σe)² / (n·Σe²) in (0, 1]: 1 when every
 *   feature carries the same energy, 1/n when one carries it all;
 * - locality: the largest share in any run of n/4 neighbouring features
 *   (features are taken as an ordered axis, such as spectrum bands by
 *   frequency): about 1/4 for an even spread, near 1 for a few lines.
 * A deviation is broadband when its spread is at least `minSpread` and its
 * locality at most `maxLocality`, and it is determined only when the excess
 * energy is at least `minStrength` times what noise gives.
 */
export interface FeatureSignature {
  /** Effective number of samples behind the mean shift. */
  samples: number;
  /** Excess energy over what noise gives, as a multiple of the noise energy (≥ 0). */
  strength: number;
  /** Participation ratio of the energy, in (0, 1]. */
  spread: number;
  /** Largest energy share in a run of a quarter of the features. */
  locality: number;
  /** Share of the energy in features whose residual rose (more energy than the reference expects). */
  rising: number;
  /** True when the deviation is strong enough to judge its shape. */
  determined: boolean;
  /** Determined, spread out and not local: a change of conditions rather than a fault's lines. */
  broadband: boolean;
  /** The features carrying the most energy, largest first (up to five), with their shares. */
  top: { feature: number; share: number }[];
}

/** The thresholds of {@link signatureOf}. */
export interface SignatureLimits {
  minSpread: number;
  maxLocality: number;
  minStrength: number;
}

/** Fewer features than this cannot tell broadband from local. */
export const MIN_SIGNATURE_FEATURES = 8;

/**
 * The signature of a mean residual shift `shift` (δ_j, length n) averaged over
 * `samples` effective samples, with the residual's calibration variance
 * `variance` (v_j) per feature.
 * @example
 * const n = 16;
 * const even = signatureOf(new Float64Array(n).fill(1), new Float64Array(n).fill(0.01), 10, { minSpread: 0.3, maxLocality: 0.5, minStrength: 4 });
 * [even.broadband, even.spread > 0.99]; // [true, true]
 */
export function signatureOf(shift: Float64Array, variance: Float64Array, samples: number, limits: SignatureLimits): FeatureSignature {
  const n = shift.length;
  const energy = new Float64Array(n);
  let total = 0;
  let squares = 0;
  let noise = 0;
  let rising = 0;
  for (let j = 0; j < n; j++) {
    const d = shift[j] as number;
    const noiseJ = (variance[j] as number) / samples;
    noise += noiseJ;
    const e = Math.max(0, d * d - noiseJ);
    energy[j] = e;
    total += e;
    squares += e * e;
    if (d > 0) rising += e;
  }
  const strength = noise > 0 ? total / noise : total > 0 ? Infinity : 0;
  if (!(total > 0)) return { samples, strength: 0, spread: 0, locality: 0, rising: 0, determined: false, broadband: false, top: [] };
  const spread = (total * total) / (n * squares);
  const run = Math.max(1, Math.round(n / 4));
  let window = 0;
  for (let j = 0; j < run; j++) window += energy[j] as number;
  let best = window;
  for (let j = run; j < n; j++) {
    window += (energy[j] as number) - (energy[j - run] as number);
    if (window > best) best = window;
  }
  const locality = best / total;
  const determined = n >= MIN_SIGNATURE_FEATURES && strength >= limits.minStrength;
  const broadband = determined && spread >= limits.minSpread && locality <= limits.maxLocality;
  return { samples, strength, spread, locality, rising: rising / total, determined, broadband, top: topShares(energy, total) };
}

function topShares(energy: Float64Array, total: number): { feature: number; share: number }[] {
  const order = Array.from(energy.keys()).sort((a, b) => (energy[b] as number) - (energy[a] as number) || a - b);
  const out: { feature: number; share: number }[] = [];
  for (const feature of order.slice(0, 5)) {
    const share = (energy[feature] as number) / total;
    if (share > 0) out.push({ feature, share });
  }
  return out;
}
