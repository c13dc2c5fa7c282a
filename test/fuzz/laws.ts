import fc from "fast-check";
import { expect } from "vitest";
import { applyMutation, mutationChoice } from "./mutation.js";
import { EXTREME_FINITE, NOT_NUMBERS, emptyCensus, probeBadSample, probeCut, probeExtreme, probeMutation, type Census, type FuzzSubject, type Outcome } from "./probe.js";

/** The four probe classes of the fuzz suite. */
export const PROBE_CLASSES = ["cut", "mutation", "bad-sample", "extreme"] as const;
export type ProbeClass = (typeof PROBE_CLASSES)[number];

/** Does the subject take samples (the last two classes apply)? */
export function takesSamples(s: FuzzSubject<unknown, unknown>): boolean {
  return s.name !== "MachineSimulator" && s.name !== "RandomSource";
}

/** One probe of the class, drawn whole (setup, cut, damage) and run on demand. */
export function probes<C, I>(s: FuzzSubject<C, I>, kind: ProbeClass): fc.Arbitrary<() => Outcome> {
  const cutOf = (length: number, f: number): number => Math.min(length, Math.floor(f * (length + 1)));
  const where = fc.integer({ min: -1, max: 5 });
  const fraction = fc.double({ min: 0, max: 1, noNaN: true, maxExcluded: true });
  switch (kind) {
    case "cut":
      return fc.tuple(s.setup, fraction).map(([setup, f]) => () => probeCut(s, setup, cutOf(setup.inputs.length, f)));
    case "mutation":
      return fc.tuple(s.setup, fraction, mutationChoice).map(([setup, f, choice]) => () => probeMutation(s, setup, cutOf(setup.inputs.length, f), (snapshot) => applyMutation(snapshot, choice)));
    case "bad-sample":
      return fc.tuple(s.setup, fraction, fc.constantFrom(...NOT_NUMBERS), where).map(([setup, f, value, at]) => () => probeBadSample(s, setup, cutOf(setup.inputs.length - 1, f), value, at));
    case "extreme":
      return fc.tuple(s.setup, fraction, fc.constantFrom(...EXTREME_FINITE), where).map(([setup, f, value, at]) => () => probeExtreme(s, setup, cutOf(setup.inputs.length - 1, f), value, at));
  }
}

/** Property: no probe of the class ends wrong or crashed; fails with the first one that does. */
export function assertProbes<C, I>(s: FuzzSubject<C, I>, kind: ProbeClass, numRuns: number): void {
  fc.assert(
    fc.property(probes(s, kind), (run) => {
      const outcome = run();
      expect(outcome.verdict === "wrong" || outcome.verdict === "crashed" ? `${s.name}, ${kind}: ${outcome.verdict}: ${outcome.detail}` : "ok").toBe("ok");
    }),
    { numRuns },
  );
}

/** Runs `numRuns` probes of the class from `seed` and counts the verdicts; keeps the first few bad details. */
export function census<C, I>(s: FuzzSubject<C, I>, kind: ProbeClass, numRuns: number, seed: number): { census: Census; examples: string[] } {
  const tally = emptyCensus();
  const examples: string[] = [];
  for (const run of fc.sample(probes(s, kind), { numRuns, seed })) {
    let outcome: Outcome;
    try {
      outcome = run();
    } catch (error) {
      outcome = { verdict: "crashed", detail: `the probe itself threw: ${String(error)}` };
    }
    tally[outcome.verdict]++;
    if ((outcome.verdict === "wrong" || outcome.verdict === "crashed") && examples.length < 3) examples.push(outcome.detail);
  }
  return { census: tally, examples };
}
