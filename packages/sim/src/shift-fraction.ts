import { requireNumber } from "@leeway/core";
import type { EnvironmentShiftEvent } from "./scenario.js";

/**
 * How much of an environment shift is in force at sample i, in [0, 1]: 0
 * outside [start, end); inside it, min(1, (i − start + 1)/ramp) for a ramp of
 * `ramp` samples (so the first sample already carries 1/ramp and the full
 * size is reached at start + ramp − 1), and 1 throughout for an abrupt shift
 * (ramp 0). Every factor of the shift is interpolated with it:
 * factor(i) = 1 + (factor − 1)·fraction(i), tone amplitudes × fraction(i).
 * @example
 * shiftFraction({ start: 10, end: 100, ramp: 4 }, 11); // 0.5
 */
export function shiftFraction(e: Pick<EnvironmentShiftEvent, "start" | "end" | "ramp">, i: number): number {
  requireNumber("shiftFraction", "i", i);
  if (i < e.start || i >= e.end) return 0;
  if (e.ramp <= 0) return 1;
  return Math.min(1, (i - e.start + 1) / e.ramp);
}
