import { numberInRange } from "@leeway/core";
import { normalSurvival } from "./normal-tail.js";

const INV_SQRT_2PI = 1 / Math.sqrt(2 * Math.PI);

/**
 * The standard normal quantile Φ⁻¹(p): the z with P(Z ≤ z) = p, for p in (0, 1).
 * Method: the rational start value of Abramowitz & Stegun (1964, 26.2.23, error < 4.5e−4)
 * polished by Halley steps on the tail P(Z > z) = q of {@link normalSurvival}, so the far
 * tails keep their relative accuracy (about 1e−14).
 *
 * @example
 * normalQuantile(0.975).toFixed(6); // "1.959964"
 */
export function normalQuantile(p: number): number {
  numberInRange("normalQuantile", "p", p, { min: 0, max: 1, minExclusive: true, maxExclusive: true });
  if (p === 0.5) return 0;
  const q = p < 0.5 ? p : 1 - p; // the smaller tail
  const z = upperTailPoint(q);
  return p < 0.5 ? -z : z;
}

/** The z > 0 with P(Z > z) = q, for q in (0, 0.5). */
function upperTailPoint(q: number): number {
  // A&S 26.2.23: t = √(−2 ln q), z ≈ t − (c₀ + c₁t + c₂t²)/(1 + d₁t + d₂t² + d₃t³).
  const t = Math.sqrt(-2 * Math.log(q));
  let z = t - (2.515517 + 0.802853 * t + 0.010328 * t * t) / (1 + 1.432788 * t + 0.189269 * t * t + 0.001308 * t * t * t);
  for (let k = 0; k < 6; k++) {
    // f(z) = S(z) − q, f′ = −φ(z), f″ = zφ(z): Halley's step z ← z − f/(f′ − f·f″/(2f′)).
    const f = normalSurvival(z) - q;
    const phi = INV_SQRT_2PI * Math.exp(-0.5 * z * z);
    const step = f / (phi + (f * z) / 2);
    z += step;
    if (Math.abs(step) <= 1e-15 * Math.abs(z)) break;
  }
  return z;
}
