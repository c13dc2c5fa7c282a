import { describe, expect, it } from "vitest";
import { MachineSimulator, defineScenario, shiftFraction, type ScenarioSpec } from "@leeway/sim";
import { expectLeewayError } from "../support/errors.js";

const base: ScenarioSpec = { length: 40, seed: 3, frameSize: 256, bins: 16, schedule: [{ start: 0, mode: "mid", rpm: 1485 }] };

function frames(spec: ScenarioSpec): Float64Array[] {
  const sim = new MachineSimulator(spec);
  const out: Float64Array[] = [];
  for (let f = sim.frame(); f !== null; f = sim.frame()) out.push(Float64Array.from(f.frame));
  return out;
}

describe("shiftFraction", () => {
  it("is 0 outside the shift, 1 throughout an abrupt one, and grows by 1/ramp per sample to 1 on a ramp (common practice, no source)", () => {
    const abrupt = { start: 10, end: 20, ramp: 0 };
    expect([9, 10, 19, 20].map((i) => shiftFraction(abrupt, i))).toEqual([0, 1, 1, 0]);
    const ramped = { start: 10, end: 20, ramp: 4 };
    expect([9, 10, 11, 12, 13, 14, 19].map((i) => shiftFraction(ramped, i))).toEqual([0, 0.25, 0.5, 0.75, 1, 1, 1]);
  });
});

describe("environment shifts with a sensor gain and a ramp", () => {
  it("a gain change multiplies every sample of the frame by the gain (same seed, same draws)", () => {
    const plain = frames(base);
    const remounted = frames({ ...base, events: [{ type: "environment-shift", start: 20, gain: 2 }] });
    for (let i = 0; i < plain.length; i++) {
      const factor = i < 20 ? 1 : 2;
      expect(Array.from(remounted[i] as Float64Array)).toEqual(Array.from(plain[i] as Float64Array, (x) => x * factor));
    }
  });

  it("a ramped gain applies 1 + (gain − 1)·fraction at each sample of the ramp", () => {
    const plain = frames(base);
    const ramped = frames({ ...base, events: [{ type: "environment-shift", start: 20, gain: 3, ramp: 4 }] });
    for (const [i, factor] of [[19, 1], [20, 1.5], [21, 2], [22, 2.5], [23, 3], [30, 3]] as const) {
      const got = ramped[i] as Float64Array;
      const want = plain[i] as Float64Array;
      for (let t = 0; t < got.length; t++) expect(got[t]).toBeCloseTo((want[t] as number) * factor, 12);
    }
  });

  it("fills gain 1 and ramp 0 by default and names the gain in the default label", () => {
    const s = defineScenario({ ...base, events: [{ type: "environment-shift", start: 5, gain: 0.5 }] });
    expect(s.events[0]).toMatchObject({ gain: 0.5, ramp: 0, noiseFactor: 1, label: "sensor gain ×0.5" });
    expect(defineScenario({ ...base, events: [{ type: "environment-shift", start: 5, noiseFactor: 2 }] }).events[0]).toMatchObject({ gain: 1, ramp: 0 });
  });

  it("refuses a gain that is not positive and a ramp longer than the shift", () => {
    const ev = (e: object) => () => defineScenario({ ...base, events: [e as never] });
    expectLeewayError(ev({ type: "environment-shift", start: 5, gain: 0 }), "E_OPTION", "events[0].gain", "0");
    expectLeewayError(ev({ type: "environment-shift", start: 5, end: 10, ramp: 6 }), "E_OPTION", "events[0].ramp", "6", "5");
    expectLeewayError(ev({ type: "environment-shift", start: 5, ramp: 1.5 }), "E_OPTION", "events[0].ramp");
  });
});
