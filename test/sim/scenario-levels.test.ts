import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { MAX_SCENARIO_LEVEL, MachineSimulator, defineScenario, degradationSeverity, type ScenarioSpec } from "@leeway/sim";
import { expectLeewayError } from "../support/errors.js";

const base = (extra: Partial<ScenarioSpec> = {}): ScenarioSpec => ({ length: 6, frameSize: 64, bins: 8, schedule: [{ start: 0, mode: "mid", rpm: 1485 }], ...extra });

describe("scenario levels (every frame and spectrum finite)", () => {
  it("refuses levels beyond MAX_SCENARIO_LEVEL = 1e6 with E_OPTION naming the field and the range", () => {
    expect(MAX_SCENARIO_LEVEL).toBe(1e6);
    expectLeewayError(() => defineScenario(base({ machine: { harmonics: [1e300] } })), "E_OPTION", "machine.harmonics[0]", "[0, 1000000]");
    expectLeewayError(() => defineScenario(base({ machine: { floorNoise: 1e7 } })), "E_OPTION", "machine.floorNoise");
    expectLeewayError(() => defineScenario(base({ events: [{ type: "fault", start: 1, duration: 2, fault: "clog", gain: 1e300 }] })), "E_OPTION", "events[0].gain");
    expectLeewayError(() => defineScenario(base({ events: [{ type: "environment-shift", start: 1, tones: [{ frequency: 50, amplitude: 1e200 }] }] })), "E_OPTION", "tones[0].amplitude");
    expectLeewayError(() => defineScenario(base({ sampleRate: 1e-3 })), "E_OPTION", "sampleRate", "[1, 1000000000]");
    expectLeewayError(() => defineScenario(base({ reference: 1e-300 })), "E_OPTION", "reference");
    expectLeewayError(() => defineScenario(base({ machine: { speedExponent: 40 }, schedule: [{ start: 0, mode: "high", rpm: 2970 }] })), "E_OPTION", "schedule[0].rpm", "speedExponent");
    expectLeewayError(() => defineScenario(base({ machine: { bearing: { balls: 9, ballDiameter: 1e-300, pitchDiameter: 39, contactAngle: 0 } } })), "E_OPTION", "ballDiameter");
  });

  it("refuses overlapping clogs or environment shifts whose product passes 1e6, and accepts the same events when they do not overlap", () => {
    const clog = (start: number) => ({ type: "fault" as const, start, duration: 2, fault: "clog" as const, gain: 1e4 });
    expectLeewayError(() => defineScenario(base({ events: [clog(1), clog(2)] })), "E_OPTION", "events[1].gain", "overlapping");
    expect(() => defineScenario(base({ events: [clog(1), clog(3)] }))).not.toThrow();
    const shift = (start: number, end: number) => ({ type: "environment-shift" as const, start, end, noiseFactor: 1e3 });
    expectLeewayError(() => defineScenario(base({ events: [shift(0, 6), shift(2, 4), shift(3, 5)] })), "E_OPTION", "noiseFactor");
    expect(() => defineScenario(base({ events: [shift(0, 3), shift(3, 6)] }))).not.toThrow();
  });

  it("refuses a sensor gain above 1e6, alone or as the product of overlapping shifts (regression: a simulator snapshot with an environment gain of 1e308 was restored, then refused its own frames)", () => {
    expectLeewayError(() => defineScenario(base({ events: [{ type: "environment-shift", start: 1, gain: 1e308 }] })), "E_OPTION", "events[0].gain", "1000000");
    const gained = (start: number, end: number) => ({ type: "environment-shift" as const, start, end, gain: 1e3 });
    expectLeewayError(() => defineScenario(base({ events: [gained(0, 6), gained(2, 4), gained(3, 5)] })), "E_OPTION", "events[2].gain", "sensor gains overlapping");
    expect(() => defineScenario(base({ events: [gained(0, 3), gained(3, 6)] }))).not.toThrow();
    const sim = new MachineSimulator(defineScenario(base({ events: [{ type: "environment-shift", start: 1, gain: 2 }] })));
    sim.next();
    const snapshot = JSON.parse(JSON.stringify(sim.snapshot()));
    snapshot.state.scenario.events[0].gain = 1e308;
    expectLeewayError(() => MachineSimulator.restore(snapshot), "E_SNAPSHOT", "gain");
  });

  it("with impacts, refuses a shaft rate above the Nyquist frequency (a frame would need more impacts than samples)", () => {
    const impacts = [{ type: "fault" as const, start: 1, duration: 2, fault: "impacts" as const }];
    expectLeewayError(() => defineScenario(base({ sampleRate: 10, events: impacts })), "E_OPTION", "schedule[0].rpm", "Nyquist");
    expect(() => defineScenario(base({ sampleRate: 10 }))).not.toThrow();
  });

  it("refuses an exponential growth rate above 700 (e^r would overflow and the severity turn NaN) and keeps severities in (0, 1] up to it", () => {
    expectLeewayError(() => defineScenario(base({ events: [{ type: "degradation", start: 1, rate: 710 }] })), "E_OPTION", "events[0].rate", "700");
    for (const i of [0, 5, 9]) {
      const s = degradationSeverity({ start: 0, end: 10, growth: "exponential", rate: 700 }, i);
      expect(s > 0 && s <= 1).toBe(true);
    }
  });

  it("property: a scenario at the edges of every accepted range gives finite frames and spectra, and its snapshot restores", () => {
    const edge = fc.constantFrom(0, 1e-300, 1, MAX_SCENARIO_LEVEL);
    fc.assert(
      fc.property(edge, edge, edge, fc.constantFrom(1, 5000, 1e9), fc.constantFrom(1e-9, 1e-3, MAX_SCENARIO_LEVEL), fc.constantFrom(4, 700), (amplitude, noise, gain, sampleRate, reference, rate) => {
        const positive = Math.max(amplitude, 1e-300);
        const spec = base({
          sampleRate,
          reference,
          machine: { harmonics: [amplitude, amplitude], vanePass: [amplitude], sensorNoise: noise, floorNoise: noise },
          events: [
            { type: "environment-shift", start: 1, noiseFactor: Math.max(gain, 0), tones: [{ frequency: 1e9, amplitude }] },
            { type: "degradation", start: 1, growth: "exponential", rate, amplitude: positive, harmonics: 10 },
            { type: "fault", start: 2, duration: 3, fault: "clog", gain: Math.max(gain, 1e-300) },
            { type: "fault", start: 2, duration: 3, fault: "looseness", gain: Math.max(gain, 1e-300) },
          ],
        });
        const sim = new MachineSimulator(spec);
        for (let i = 0; i < 3; i++) {
          const raw = sim.frame();
          for (const x of raw?.frame ?? []) expect(Number.isFinite(x)).toBe(true);
        }
        const restored = MachineSimulator.restore(JSON.parse(JSON.stringify(sim.snapshot())));
        for (let s = restored.next(); s !== null; s = restored.next()) for (const v of s.spectrum) expect(Number.isFinite(v)).toBe(true);
      }),
      { numRuns: 60 },
    );
  });
});
