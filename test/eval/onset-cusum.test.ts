import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { onsetCusumAlarms } from "@leeway/eval";

function lognormalScores(n: number, shiftAt: number, shift: number, seed: string): Float64Array {
  const rng = new RandomSource(seed);
  return Float64Array.from({ length: n }, (_, i) => Math.exp((i >= shiftAt ? shift : 0) + rng.normal()));
}

describe("onsetCusumAlarms", () => {
  it("alarms soon after a true upward step and once for a persisting shift (common practice, no source)", () => {
    const scores = lognormalScores(6000, 4000, 1, "up");
    const flags = onsetCusumAlarms({ scores, calibrationStart: 0, calibrationEnd: 2000, events: [{ start: 4000, end: 6000 }], targetArl0: 20000 });
    const alarms = [...flags.keys()].filter((i) => flags[i] === 1);
    expect(alarms.filter((i) => i >= 4000)).toHaveLength(1);
    expect(alarms.find((i) => i >= 4000)! - 4000).toBeLessThan(40);
  });

  it("tunes its direction to the true shift: a downward step is found as well", () => {
    const scores = lognormalScores(6000, 4000, -1, "down");
    const flags = onsetCusumAlarms({ scores, calibrationStart: 0, calibrationEnd: 2000, events: [{ start: 4000, end: 6000 }], targetArl0: 20000 });
    expect(flags.indexOf(1, 4000) - 4000).toBeLessThan(40);
  });

  it("raises few false alarms on a stream without change: in-control ARL near its target (Siegmund's approximation, Montgomery ISQC §9.1)", () => {
    const scores = lognormalScores(202_000, Infinity, 0, "null");
    const flags = onsetCusumAlarms({ scores, calibrationStart: 0, calibrationEnd: 2000, events: [], targetArl0: 2000 });
    const alarms = flags.reduce((s, f) => s + f, 0);
    // 200 000 samples at an ARL of 2000: about 100 alarms when the chart restarts; it re-arms only at S = 0, so somewhat fewer.
    expect(alarms).toBeGreaterThan(30);
    expect(alarms).toBeLessThan(200);
  });

  it("does not chart the calibration span", () => {
    const scores = lognormalScores(3000, 0, 5, "early");
    const flags = onsetCusumAlarms({ scores, calibrationStart: 0, calibrationEnd: 2000, events: [], targetArl0: 20000 });
    expect(flags.subarray(0, 2000).every((f) => f === 0)).toBe(true);
  });
});
