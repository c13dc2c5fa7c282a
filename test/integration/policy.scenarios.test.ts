import { describe, expect, it } from "vitest";
import type { Decision } from "@leeway/policy";
import { abruptFault, conceptDrift, driftThenDegradation, recurringModes, slowDegradation, type TruthEvent } from "@leeway/sim";
import { alarmsIn, enginePolicy, runPolicy, stream, SUITE_LENGTH } from "./policy.support.js";

// The engine in feature mode (its own autoencoder pool and frozen references)
// on the simulator's test-suite presets, fixed seeds. The operator
// acknowledges every alarm 30 samples after it is raised.

const L = SUITE_LENGTH;
const eventOf = (events: TruthEvent[], type: TruthEvent["type"]): TruthEvent => events.find((e) => e.type === type) as TruthEvent;

describe("DecisionEngine on the simulator's scenarios", () => {
  it("pure concept drift: settles, one retrain with cause concept-drift, no alarm after it", () => {
    const { spectra, events } = stream("conceptDrift", () => conceptDrift({ length: L, seed: 1 }));
    const drift = eventOf(events, "environment-shift");
    const run = runPolicy(enginePolicy(), spectra);
    expect(run.retrains.length + run.switches.length).toBe(1);
    const at = run.retrains[0] as number;
    const retrain = run.decisions[at] as Decision;
    expect(retrain.cause).toBe("concept-drift");
    expect(run.decisions[at - 1]?.phase).toBe("settling");
    expect(alarmsIn(run, at + 1, L)).toEqual([]);
    // nothing learnt from detection to the retrain; the candidate passed validation on held-out settled samples
    const detected = run.decisions.findIndex((d, i) => i >= drift.start && d.action !== "learn");
    expect(detected - drift.start).toBeLessThan(10);
    expect(run.learnt.filter((i) => i >= detected && i <= at)).toEqual([]);
    const candidate = retrain.evidence.candidate as { passed: boolean; heldOutLoss: number; referenceLoss: number };
    expect(candidate.passed).toBe(true);
    expect(candidate.heldOutLoss).toBeLessThan(candidate.referenceLoss);
    // and afterwards it learns the new condition as normal
    expect(run.learnt.filter((i) => i > at).length).toBeGreaterThan(0.8 * (L - at - 1000));
  });

  it("pure slow degradation: a degradation alarm before severity 0.10, no retrain, nothing learnt once the evidence appears", () => {
    for (const seed of [1, 2]) {
      const { spectra, truth, events } = stream(`slowDegradation/${seed}`, () => slowDegradation({ length: L, seed }));
      const onset = eventOf(events, "degradation").start;
      const run = runPolicy(enginePolicy(), spectra);
      const first = run.decisions[run.alarms[0] as number] as Decision;
      expect(first.cause).toBe("degradation");
      expect(first.index).toBeGreaterThan(onset);
      expect(truth[first.index]?.severity).toBeLessThan(0.1);
      expect(run.retrains).toEqual([]);
      const evidence = run.decisions.findIndex((d, i) => i >= onset && d.cause === "degradation");
      expect(run.learnt.filter((i) => i >= evidence)).toEqual([]);
      console.log(`slow degradation, seed ${seed}: onset ${onset}, first degradation evidence at ${evidence} (severity ${truth[evidence]?.severity.toFixed(3)}), alarm at ${first.index} (severity ${truth[first.index]?.severity.toFixed(3)}); samples learnt between onset and evidence: ${run.learnt.filter((i) => i >= onset && i < evidence).length}`);
    }
  });

  it("drift, then degradation: one retrain for the drift, then degradation detected against the new reference", () => {
    const { spectra, truth, events } = stream("driftThenDegradation", () => driftThenDegradation({ length: L, seed: 1 }));
    const drift = eventOf(events, "environment-shift");
    const degradation = eventOf(events, "degradation");
    const run = runPolicy(enginePolicy(), spectra);
    expect(run.retrains).toHaveLength(1);
    expect(run.retrains[0]).toBeGreaterThan(drift.start);
    expect(run.retrains[0]).toBeLessThan(degradation.start);
    const alarm = run.alarms.map((a) => run.decisions[a] as Decision).find((d) => d.cause === "degradation" && d.index >= degradation.start);
    expect(alarm?.evidence.activeReference).toBe(1);
    expect(truth[(alarm as Decision).index]?.severity).toBeLessThan(0.2);
    expect(alarmsIn(run, (run.retrains[0] as number) + 1, degradation.start)).toEqual([]);
  });

  it("recurring modes A → B → A: B is retrained, the return to A is a switch-mode to the commissioning reference", () => {
    const { spectra, events } = stream("recurringModes", () => recurringModes({ length: L, seed: 1 }));
    const [toB, toA] = events as [TruthEvent, TruthEvent];
    const run = runPolicy(enginePolicy(), spectra);
    expect(run.retrains).toHaveLength(1);
    expect(run.retrains[0]).toBeGreaterThan(toB.start);
    expect(run.retrains[0]).toBeLessThan(toA.start);
    expect(run.switches).toHaveLength(1);
    const sw = run.decisions[run.switches[0] as number] as Decision;
    expect(sw.index).toBeGreaterThan(toA.start);
    expect([sw.action, sw.cause, sw.evidence.switchedTo]).toEqual(["switch-mode", "known-mode", 0]);
    // the live pool knows A: no alarm on the return
    expect(alarmsIn(run, toA.start, L)).toEqual([]);
  });

  it("abrupt fault: an anomaly alarm within a few samples, none of its samples learnt, no retrain", () => {
    const { spectra, events } = stream("abruptFault", () => abruptFault({ length: L, seed: 1 }));
    const fault = eventOf(events, "fault");
    const run = runPolicy(enginePolicy(), spectra);
    const alarm = run.decisions[run.alarms[0] as number] as Decision;
    expect(alarm.cause).toBe("anomaly");
    expect(alarm.index - fault.start).toBeGreaterThanOrEqual(0);
    expect(alarm.index - fault.start).toBeLessThan(15);
    expect(run.learnt.filter((i) => i >= fault.start && i < fault.end)).toEqual([]);
    expect(run.retrains).toEqual([]);
    expect(run.alarms).toHaveLength(1);
    expect(run.decisions[L - 1]?.action).toBe("learn");
  });
});
