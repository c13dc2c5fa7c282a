import { describe, expect, it } from "vitest";
import { OselmAutoencoder } from "@leeway/pool";
import { CORE_DEFAULTS, DecisionEngine, type Decision } from "@leeway/policy";
import { MachineSimulator, driftThenDegradation, stationaryNull } from "@leeway/sim";
import { ACKNOWLEDGE_AFTER, FEATURE_OPTIONS, stream, SUITE_LENGTH } from "./policy.support.js";

/** Drops the evidence only feature mode can have (the candidate's validation, the pool slot it took). */
function comparable(d: Decision): unknown {
  const { candidate, member, features, degradationAgreement, ...evidence } = d.evidence;
  void candidate;
  void member;
  void features; // feature mode's residual signature; score-only mode has none
  void degradationAgreement; // the same: feature mode compares feature shifts, the decision must still agree
  return { ...d, evidence };
}

describe("score-only mode and feature mode", () => {
  it("give the same decisions when fed the same scores (drift, retrain, then degradation)", () => {
    for (const [name, make] of [["driftThenDegradation", () => driftThenDegradation({ length: SUITE_LENGTH, seed: 1 })]] as const) {
      const { spectra } = stream(name, make);
      const features = new DecisionEngine({ ...FEATURE_OPTIONS });
      const { inputs, hidden, members, ...coreOptions } = FEATURE_OPTIONS;
      void inputs;
      void hidden;
      void members;
      const scores = new DecisionEngine(coreOptions);
      let ackAt = -1;
      let confirmAt = -1;
      let retrains = 0;
      spectra.forEach((x, i) => {
        const a = features.observe(x);
        const b = scores.observeScores(a.evidence.liveScore, a.evidence.referenceScores);
        expect(comparable(b)).toEqual(comparable(a));
        if (a.action === "retrain") {
          scores.modelReplaced();
          retrains++;
        }
        if (a.action === "alarm") ackAt = i + ACKNOWLEDGE_AFTER;
        if (i === ackAt) {
          features.acknowledge();
          scores.acknowledge();
        }
        if (a.action === "await-confirmation") confirmAt = i + ACKNOWLEDGE_AFTER;
        if (i === confirmAt) {
          features.confirmRetrain();
          scores.confirmRetrain();
        }
      });
      expect(retrains).toBe(1);
      expect(scores.retrains).toBe(features.retrains);
    }
  });
});

describe("stationary null, 10^5 samples", () => {
  // Score-only mode on scores of the simulator's stationary preset: a 256-8-256
  // OS-ELM autoencoder fitted on the first 600 spectra scores every spectrum
  // (live and reference alike). The false-alarm behaviour of the decision core
  // depends only on the score stream; the pool's learning is exercised by the
  // scenario tests. This keeps 10^5 samples within a few seconds.
  it("raises no degradation alarm and fires the drift test no more often than the calibrated ARL0 allows", () => {
    const length = 100_000;
    const sim = new MachineSimulator(stationaryNull({ length, seed: 11 }));
    const model = new OselmAutoencoder({ inputs: 256, hidden: 8, seed: 3 });
    const first: Float64Array[] = [];
    const engine = new DecisionEngine({ seed: 5 });
    let changes = 0;
    let alarms = 0;
    let degradation = 0;
    for (let s = sim.next(); s !== null; s = sim.next()) {
      if (s.index < 600) {
        first.push(Float64Array.from(s.spectrum));
        if (s.index === 599) model.fit(first);
        engine.observeScores(1);
        continue;
      }
      const d = engine.observeScores(model.score(s.spectrum));
      const change = d.evidence.change as { status: string } | undefined;
      if (change?.status === "change") changes++;
      if (d.action === "alarm") {
        alarms++;
        if (d.cause === "degradation") degradation++;
        engine.acknowledge();
      }
    }
    // Poisson: with 10^5/ARL0 = 5 expected in-control firings, P(N > 13) < 0.001.
    const expected = length / CORE_DEFAULTS.targetArl0;
    let upper = 0;
    for (let p = Math.exp(-expected), cdf = p; cdf < 0.999; upper++, p *= expected / upper, cdf += p);
    console.log(`stationary null (10^5 samples): ${changes} change-test firings (expected at most ${expected} at ARL0 ${CORE_DEFAULTS.targetArl0}, 99.9 % bound ${upper}), ${alarms} alarms, ${degradation} degradation alarms`);
    expect(degradation).toBe(0);
    expect(changes).toBeLessThanOrEqual(upper);
  });
});
