import { ConformalMartingale, correlatedCusumThreshold, Cusum, PageHinkley, type ChangeTest } from "@leeway/change";
import type { ChangeTestChoice } from "./options.js";

/** Reference value k of the default CUSUM (and tolerance δ of Page-Hinkley), in σ: tuned to a 1σ shift. */
export const CHANGE_REFERENCE_VALUE = 0.5;

/**
 * Default threshold λ of the engine's conformal martingale (the option
 * `martingaleThreshold`): on an exchangeable in-control stream it alarms
 * between two restarts with probability at most 1/λ = 1 % (Ville's
 * inequality), whatever the scores' distribution.
 */
export const MARTINGALE_THRESHOLD = 100;

/**
 * Samples at the start of each watching span that fix the martingale's grid
 * of normalised scores (its resolution) and are not tested; a restart after an
 * alarm keeps the grid.
 */
export const MARTINGALE_BURN_IN = 100;

/**
 * A two-sided change test on normalised scores z (in-control mean 0, σ 1)
 * with the given threshold (h for CUSUM, λ for Page-Hinkley, both in σ; the
 * martingale's λ is a level of the martingale itself, see
 * {@link MARTINGALE_THRESHOLD}).
 * @example
 * makeChangeTest("martingale", MARTINGALE_THRESHOLD).name; // "ConformalMartingale"
 */
export function makeChangeTest(choice: ChangeTestChoice, threshold: number): ChangeTest {
  if (choice === "page-hinkley") {
    return new PageHinkley({ alarmLevel: threshold, tolerance: CHANGE_REFERENCE_VALUE, knownMean: 0, direction: "both", armAfter: 0 });
  }
  if (choice === "martingale") {
    // Conformal test martingale (Vovk et al., 2003; Volkhonskiy et al., 2017), Simple Jumper betting
    return new ConformalMartingale({ threshold, burnIn: MARTINGALE_BURN_IN, direction: "both", betting: "jumper", seed: 1 });
  }
  return new Cusum({ k: CHANGE_REFERENCE_VALUE, h: threshold, mean: 0, sigma: 1, direction: "both" });
}

/**
 * The threshold that gives the chosen test an in-control average run length
 * of `targetArl0` samples on streams like `normalScores` (see
 * `correlatedCusumThreshold` of @leeway/change). The martingale needs no
 * calibration: it gets `martingaleThreshold` (default
 * {@link MARTINGALE_THRESHOLD}) whatever the scores.
 */
export function calibratedThreshold(choice: ChangeTestChoice, normalScores: Float64Array, targetArl0: number, replicates: number, seed: string, martingaleThreshold = MARTINGALE_THRESHOLD): number {
  if (choice === "martingale") return martingaleThreshold;
  return correlatedCusumThreshold((threshold: number) => makeChangeTest(choice, threshold), normalScores, { targetArl0, replicates, seed, k: CHANGE_REFERENCE_VALUE });
}
