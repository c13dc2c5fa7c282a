import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { poissonInterval, runLengths } from "@leeway/eval";
import { expectLeewayError } from "../support/errors.js";

describe("runLengths", () => {
  it("refuses unequal masks and a bad level", () => {
    expectLeewayError(() => runLengths(new Uint8Array(5), new Uint8Array(4)), "E_DIMENSION", "falseAlarmAt", "5", "4");
    expectLeewayError(() => runLengths(new Uint8Array(5), new Uint8Array(5), 0), "E_OPTION", "level", "0");
  });

  it("ignores a false alarm flagged at an excluded sample", () => {
    const r = runLengths(Uint8Array.of(0, 1, 0), Uint8Array.of(0, 1, 0));
    expect(r.falseAlarms).toBe(0);
    expect(r.censored).toEqual([1, 1]);
  });

  it("splits the in-control samples into completed and censored runs", () => {
    // in control: 0–3, 6–9; false alarms at 1 and 8
    const excluded = Uint8Array.from([0, 0, 0, 0, 1, 1, 0, 0, 0, 0]);
    const alarms = Uint8Array.from([0, 1, 0, 0, 0, 0, 0, 0, 1, 0]);
    const r = runLengths(excluded, alarms, 0.95);
    expect(r.completed).toEqual([2, 3]);
    expect(r.censored).toEqual([2, 1]);
    expect(r.exposure).toBe(8);
    expect(r.arl).toBe(4);
    const counts = poissonInterval(2, 0.95);
    expect(r.interval).toEqual({ level: 0.95, lower: 8 / counts.upper, upper: 8 / counts.lower });
  });

  it("with no false alarm gives no estimate, a lower bound exposure/ln(2/α) and no upper bound", () => {
    const r = runLengths(new Uint8Array(100), new Uint8Array(100), 0.95);
    expect(r.arl).toBeNull();
    expect(r.interval.lower).toBeCloseTo(100 / Math.log(40), 10);
    expect(r.interval.upper).toBeNull();
    expect(r.censored).toEqual([100]);
  });

  it("on geometric run lengths the interval covers the true ARL in at least its level of replicates (seeded)", () => {
    // p = 1/50 per sample, 2000 samples per replicate; Garwood's interval is conservative (coverage ≥ level).
    // 400 replicates: the binomial SD of the coverage at 0.9 is 0.015, so 0.86 is 2.7 SD below.
    const arl = 50;
    const replicates = 400;
    const random = new RandomSource(20261201);
    let covered = 0;
    for (let rep = 0; rep < replicates; rep++) {
      const alarms = new Uint8Array(2000);
      for (let i = 0; i < alarms.length; i++) alarms[i] = random.next() < 1 / arl ? 1 : 0;
      const r = runLengths(new Uint8Array(alarms.length), alarms, 0.9);
      if (r.interval.lower <= arl && (r.interval.upper === null || arl <= r.interval.upper)) covered++;
    }
    expect(covered / replicates).toBeGreaterThan(0.86);
  });
});
