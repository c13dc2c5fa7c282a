import { finiteNumber, nonNegativeNumber, oneOf, optionsObject, positiveNumber } from "@leeway/core";

/** Options of {@link cusumArl}. */
export interface CusumArlOptions {
  /** 2 (default) for the two-sided tabular CUSUM, 1 for the upper side alone. */
  sides?: 1 | 2;
}

/**
 * Average run length of a tabular CUSUM by Siegmund's (1985) approximation. For one side with drift
 * Δ (Δ = δ − k upward; Δ = −δ − k for the lower side) and b = h + 1.166:
 *
 *   ARL = (exp(−2Δb) + 2Δb − 1) / (2Δ²),  ARL = b² when Δ = 0,
 *
 * and for the two-sided chart 1/ARL = 1/ARL⁺ + 1/ARL⁻ (Montgomery, *Introduction to Statistical Quality
 * Control*, §9.1). k, h and the shift δ are in σ units. It is within about 1 % of the exact ARL for
 * δ ≤ 1 and underestimates it at large shifts.
 * @example
 * cusumArl(0.5, 5, 0); // 469.1… (two-sided; the exact value is 465)
 */
export function cusumArl(k: number, h: number, shift: number, options: CusumArlOptions = {}): number {
  const o = optionsObject<CusumArlOptions>("cusumArl", options, ["sides"]);
  nonNegativeNumber("cusumArl", "k", k);
  positiveNumber("cusumArl", "h", h);
  finiteNumber("cusumArl", "shift", shift);
  const sides = o.sides === undefined ? 2 : oneOf("cusumArl", "sides", o.sides, [1, 2] as const);
  const b = h + 1.166;
  const upper = siegmund(shift - k, b);
  if (sides === 1) return upper;
  const lower = siegmund(-shift - k, b);
  return 1 / (1 / upper + 1 / lower);
}

function siegmund(drift: number, b: number): number {
  if (Math.abs(drift) < 1e-9) return b * b;
  const x = 2 * drift * b;
  return (Math.exp(-x) + x - 1) / (2 * drift * drift);
}
