import { describe, it } from "vitest";
import { assertProbes, PROBE_CLASSES, takesSamples, type ProbeClass } from "./laws.js";
import type { FuzzSubject } from "./probe.js";

/** Runs of each probe class for one component in npm test (the census in bench/ runs more). */
export type FuzzRuns = Record<ProbeClass, number>;

const TITLES: Record<ProbeClass, string> = {
  cut: "cut, restore through JSON, continue: the same readings bit for bit and the same final snapshot",
  mutation: "a mutated snapshot is refused with E_SNAPSHOT or proven harmless (finite readings, no throw, restorable)",
  "bad-sample": "a non-number where a sample goes is refused with a LeewayError and the state unchanged",
  extreme: "an extreme finite sample is refused with the state unchanged, or leaves finite readings and a restorable snapshot that continues bit for bit",
};

/**
 * The laws of the fuzz suite for one component (all four by default; the
 * sample laws only for components that take samples): cut/restore/continue is
 * bit-identical; a mutated snapshot is refused or proven harmless; a
 * non-number sample is refused with the state unchanged; an extreme finite
 * sample is refused with the state unchanged or leaves finite readings and a
 * restorable, bit-identical snapshot.
 */
export function fuzzLaws(s: FuzzSubject<unknown, unknown>, runs: FuzzRuns, laws: readonly ProbeClass[] = PROBE_CLASSES): void {
  describe(`fuzz: ${s.name}`, () => {
    for (const law of laws) {
      if ((law === "bad-sample" || law === "extreme") && !takesSamples(s)) continue;
      it(TITLES[law], () => assertProbes(s, law, runs[law]));
    }
  });
}
