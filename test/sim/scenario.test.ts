import { describe, expect, it } from "vitest";
import { defineScenario, PS2_MACHINE, type ScenarioSpec } from "@leeway/sim";
import { expectLeewayError, throughJson } from "../support/errors.js";

const base: ScenarioSpec = { length: 1000, schedule: [{ start: 0, mode: "mid", rpm: 1485 }] };

describe("defineScenario", () => {
  it("fills the defaults: 5 kHz, 1024-sample frames, 256 bins, Hann, 1 mm/s² reference, the PS-2 machine; the result is plain JSON data", () => {
    const s = defineScenario(base);
    expect([s.sampleRate, s.frameSize, s.bins, s.window, s.reference, s.seed]).toEqual([5000, 1024, 256, "hann", 0.001, 1]);
    expect(s.machine).toEqual({ ...PS2_MACHINE, bearing: { ...PS2_MACHINE.bearing } });
    expect(throughJson(s)).toEqual(s);
    expect(defineScenario(throughJson(s))).toEqual(s);
  });

  it("fills event defaults and turns a duration into an exclusive end", () => {
    const s = defineScenario({
      ...base,
      events: [
        { type: "degradation", start: 100 },
        { type: "fault", start: 200, duration: 50, fault: "impacts" },
        { type: "environment-shift", start: 300, end: 400, noiseFactor: 3 },
      ],
    });
    expect(s.events[0]).toEqual({ type: "degradation", start: 100, end: 1000, defect: "outer-race", growth: "exponential", rate: 4, amplitude: 0.4, harmonics: 3, modulation: 0.5, label: "outer-race defect" });
    expect(s.events[1]).toEqual({ type: "fault", start: 200, end: 250, fault: "impacts", gain: 4, label: "impacts" });
    expect(s.events[2]).toMatchObject({ start: 300, end: 400, noiseFactor: 3, tones: [], label: "noise floor ×3" });
  });

  it("refuses an empty timeline: length 0, no schedule, or a schedule not starting at 0", () => {
    expectLeewayError(() => defineScenario({ ...base, length: 0 }), "E_OPTION", "length", "[1,");
    expectLeewayError(() => defineScenario({ ...base, schedule: [] }), "E_OPTION", "schedule", "empty timeline");
    expectLeewayError(() => defineScenario({ ...base, schedule: [{ start: 5, mode: "mid", rpm: 1485 }] }), "E_OPTION", "schedule[0].start", "0");
    expectLeewayError(() => defineScenario(undefined as never), "E_OPTION", "spec");
  });

  it("refuses negative and zero durations, ends before starts and events outside the timeline", () => {
    const ev = (e: object) => () => defineScenario({ ...base, events: [e as never] });
    expectLeewayError(ev({ type: "fault", fault: "clog", start: 10, duration: -5 }), "E_OPTION", "events[0].duration", "positive");
    expectLeewayError(ev({ type: "fault", fault: "clog", start: 10, duration: 0 }), "E_OPTION", "events[0].duration");
    expectLeewayError(ev({ type: "degradation", start: 10, end: 5 }), "E_OPTION", "events[0].end", "> start = 10");
    expectLeewayError(ev({ type: "degradation", start: 10, end: 10 }), "E_OPTION", "events[0].end");
    expectLeewayError(ev({ type: "degradation", start: -1 }), "E_OPTION", "events[0].start");
    expectLeewayError(ev({ type: "degradation", start: 1000 }), "E_OPTION", "events[0].start");
    expectLeewayError(ev({ type: "degradation", start: 900, duration: 200 }), "E_OPTION", "events[0].end", "1000");
    expectLeewayError(ev({ type: "fault", fault: "clog", start: 10 }), "E_OPTION", "events[0].end", "fault");
    expectLeewayError(ev({ type: "fault", fault: "clog", start: 10, end: 20, duration: 10 }), "E_OPTION", "events[0].duration", "not both");
  });

  it("refuses bad schedules, modes, event kinds and machine values, naming the field", () => {
    const sched = (schedule: unknown) => () => defineScenario({ ...base, schedule: schedule as never });
    expectLeewayError(sched([{ start: 0, mode: "a", rpm: 1 }, { start: 0, mode: "b", rpm: 2 }]), "E_OPTION", "schedule[1].start", "time order");
    expectLeewayError(sched([{ start: 0, mode: "a", rpm: 1 }, { start: 5, mode: "a", rpm: 2 }]), "E_OPTION", "schedule[1].rpm", "\"a\"");
    expectLeewayError(sched([{ start: 0, mode: "", rpm: 1 }]), "E_OPTION", "schedule[0].mode");
    expectLeewayError(sched([{ start: 0, mode: "a", rpm: -1 }]), "E_OPTION", "schedule[0].rpm");
    expectLeewayError(sched([{ start: 0, mode: "a", rpm: 1, speed: 3 }]), "E_OPTION", "speed");
    const ev = (e: object) => () => defineScenario({ ...base, events: [e as never] });
    expectLeewayError(ev({ type: "earthquake", start: 1 }), "E_OPTION", "events[0].type");
    expectLeewayError(ev({ type: "fault", fault: "fire", start: 1, end: 2 }), "E_OPTION", "events[0].fault");
    expectLeewayError(ev({ type: "degradation", start: 1, defect: "seal" }), "E_OPTION", "events[0].defect");
    expectLeewayError(ev({ type: "degradation", start: 1, modulation: 2 }), "E_OPTION", "events[0].modulation");
    expectLeewayError(ev({ type: "environment-shift", start: 1, tones: [{ frequency: -3, amplitude: 1 }] }), "E_OPTION", "events[0].tones[0].frequency");
    expectLeewayError(() => defineScenario({ ...base, frameSize: 1000 }), "E_OPTION", "frameSize", "power of two");
    expectLeewayError(() => defineScenario({ ...base, bins: 513 }), "E_OPTION", "bins", "[1, 512]");
    expectLeewayError(() => defineScenario({ ...base, machine: { vanes: 0 } }), "E_OPTION", "machine.vanes");
    expectLeewayError(() => defineScenario({ ...base, machine: { jitter: 0.5 } }), "E_OPTION", "machine.jitter", "[0, 0.1]");
    expectLeewayError(() => defineScenario({ ...base, machine: { harmonics: [0.5, -1] } }), "E_OPTION", "machine.harmonics[1]");
    expectLeewayError(() => defineScenario({ ...base, machine: { wheels: 3 } as never }), "E_OPTION", "wheels");
    expectLeewayError(() => defineScenario({ ...base, duration: 5 } as never), "E_OPTION", "duration");
  });
});
