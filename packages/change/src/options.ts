import { integerInRange, numberInRange, oneOf } from "@leeway/core";
import { requireBatch } from "@leeway/stats";
import type { ChangeSides } from "./change-test.js";

/** The default warning fraction: `"warning"` once the statistic passes half of the threshold. */
export const DEFAULT_WARNING_FRACTION = 0.5;

/** Validates `warningFraction` (in (0, 1]); default {@link DEFAULT_WARNING_FRACTION}. */
export function warningFractionOption(component: string, value: unknown): number {
  if (value === undefined) return DEFAULT_WARNING_FRACTION;
  return numberInRange(component, "warningFraction", value, { min: 0, max: 1, minExclusive: true });
}

/** Validates `direction` (`"up"`, `"down"` or `"both"`). */
export function sidesOption(component: string, value: unknown, fallback: ChangeSides): ChangeSides {
  if (value === undefined) return fallback;
  return oneOf(component, "direction", value, ["up", "down", "both"] as const);
}

/** Validates the arguments of `scan`: `xs` a Float64Array (else `E_SAMPLE`), `from` an index into it. */
export function scanStart(component: string, xs: Float64Array, from: number): number {
  requireBatch(component, xs);
  return integerInRange(component, "from", from, 0, xs.length);
}
