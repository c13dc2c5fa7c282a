import { correlatedCusumThreshold, Cusum, PageHinkley, type ChangeTest } from "@leeway/change";
import type { ChangeTestChoice } from "./options.js";

/** Reference value k of the default CUSUM (and tolerance δ of Page-Hinkley), in σ: tuned to a 1σ shift. */
export const CHANGE_REFERENCE_VALUE = 0.5;

/**
 * A two-sided change test on normalised scores z (in-control mean 0, σ 1)
 * with the given threshold (h for CUSUM, λ for Page-Hinkley, both in σ).
 */
export function makeChangeTest(choice: ChangeTestChoice, threshold: number): ChangeTest {
  if (choice === "page-hinkley") {
    return new PageHinkley({ alarmLevel: threshold, tolerance: CHANGE_REFERENCE_VALUE, knownMean: 0, direction: "both", armAfter: 0 });
  }
  return new Cusum({ k: CHANGE_REFERENCE_VALUE, h: threshold, mean: 0, sigma: 1, direction: "both" });
}

/**
 * The threshold that gives the chosen test an in-control average run length
 * of `targetArl0` samples on streams like `normalScores` (see
 * `correlatedCusumThreshold` of @leeway/change).
 */
export function calibratedThreshold(choice: ChangeTestChoice, normalScores: Float64Array, targetArl0: number, replicates: number, seed: string): number {
  return correlatedCusumThreshold((threshold: number) => makeChangeTest(choice, threshold), normalScores, { targetArl0, replicates, seed, k: CHANGE_REFERENCE_VALUE });
}
