import { describe, expect, it } from "vitest";
import { ChangePointPosterior } from "@leeway/change";
import { RandomSource } from "@leeway/core";
import { changeOnset, DecisionEngine } from "@leeway/policy";
import { MachineSimulator, harbourLane } from "@leeway/sim";
import { expectLeewayError } from "../support/errors.js";

describe("changeOnset", () => {
  it("the @example: a 2 σ rise at sample 300 of a window starting at 5000 began at 5300", () => {
    const z = Float64Array.from({ length: 400 }, (_, i) => (i < 300 ? 0 : 2) + Math.sin(i * 1.7) * 0.8);
    const o = changeOnset(z, { firstIndex: 5000 });
    expect([o.onset, o.runLength]).toEqual([5300, 100]);
    expect(o.earliest).toBeLessThanOrEqual(5300);
    expect(o.latest).toBeGreaterThanOrEqual(5300);
    // no change in the window: no onset
    expect(changeOnset(z.subarray(0, 300), { firstIndex: 5000 }).onset).toBeNull();
  });

  it("is the mode of ChangePointPosterior's run length after the window's last value (same model, linear scale)", () => {
    const rng = new RandomSource("onset-same");
    const xs = Float64Array.from({ length: 500 }, (_, i) => (i < 350 ? 0 : 1.2) + rng.normal());
    const post = new ChangePointPosterior({ scale: "linear", mean: 0, sigma: 1, expectedRunLength: 1000 });
    let last = post.observe(xs[0] as number);
    for (let i = 1; i < xs.length; i++) last = post.observe(xs[i] as number);
    const o = changeOnset(xs, { firstIndex: 100 });
    expect(o.runLength).toBe(last.runLength);
    expect(o.onset).toBe(100 + (last.onset as number));
    const { lengths, probabilities } = post.runLengths();
    expect(o.probability).toBe(probabilities[lengths.indexOf(last.runLength)]);
  });

  it("finds a 1.5 σ shift in Gaussian noise within 10 samples in at least 90 of 100 windows, and its 90 % span holds the truth in at least 80 (simulated, Adams & MacKay 2007 model; from memory)", () => {
    let near = 0;
    let held = 0;
    for (let r = 0; r < 100; r++) {
      const rng = new RandomSource(`onset-${r}`);
      const at = 200 + rng.integer(200);
      const xs = Float64Array.from({ length: 600 }, (_, i) => (i < at ? 0 : 1.5) + rng.normal());
      const o = changeOnset(xs);
      if (o.onset !== null && Math.abs(o.onset - at) <= 10) near++;
      if (o.earliest <= at && at <= o.latest) held++;
    }
    console.log(`changeOnset: within 10 samples in ${near}/100, 90 % span held the onset in ${held}/100`);
    expect(near).toBeGreaterThanOrEqual(90);
    expect(held).toBeGreaterThanOrEqual(80);
  });

  it("refuses bad input naming it", () => {
    expectLeewayError(() => changeOnset([]), "E_OPTION", "values");
    expectLeewayError(() => changeOnset([0, Number.NaN]), "E_OPTION", "values[1]");
    expectLeewayError(() => changeOnset([0, 1], { sigma: 0 }), "E_OPTION", "sigma");
    expectLeewayError(() => changeOnset([0, 1], { firstIndex: -1 }), "E_OPTION", "firstIndex");
    expectLeewayError(() => changeOnset([0, 1], { credibility: 1 }), "E_OPTION", "credibility");
    expectLeewayError(() => changeOnset([0, 1], { maxHypotheses: 1 }), "E_OPTION", "maxHypotheses");
  });
});

describe("changeOnset in the demo scenario", () => {
  it("Harbour Lane at one sample per 10 s, mid-speed engine: at the first decision that stops learning after the compressor's installation (hour 34), the hour of normalised reference scores before it places the onset at the installation sample (the guide's example)", () => {
    const SCALE = 360;
    const options = { inputs: 256, seed: 1, members: 3, hidden: 16, commissioning: 120, calibration: 120, settling: 90, settlingLimit: 360, trendBlock: 6, coolDown: 180, baselineHalfLife: 180, targetArl0: 2000, retrainHorizon: 8640 };
    const sim = new MachineSimulator(harbourLane({ scale: SCALE }));
    const engine = new DecisionEngine(options);
    const u: number[] = [];
    const simIndex: number[] = [];
    let found: { alarmAt: number; onsetAt: number | null; runLength: number } | null = null;
    for (let s = sim.next(); s !== null && found === null; s = sim.next()) {
      if (s.truth.mode !== "mid") continue;
      const d = engine.observe(s.spectrum);
      u.push(Math.log((d.evidence.referenceScores[0] ?? Number.NaN) + 1e-12));
      simIndex.push(s.index);
      if (s.index < 34 * SCALE || d.action === "learn" || d.cause === "normal") continue;
      // normalise by the engine's calibration span (its samples 120 to 239), as its rules do
      const calibration = u.slice(120, 240);
      const mean = calibration.reduce((a, b) => a + b, 0) / calibration.length;
      const spread = Math.sqrt(calibration.reduce((a, b) => a + (b - mean) ** 2, 0) / (calibration.length - 1));
      const window = u.slice(-SCALE).map((x) => (x - mean) / spread);
      const o = changeOnset(window);
      found = { alarmAt: s.index, onsetAt: o.onset === null ? null : (simIndex[simIndex.length - SCALE + o.onset] as number), runLength: o.runLength };
      expect(["hold", "alarm"]).toContain(d.action); // the first decision that stops learning (the broadband rise is settled on, not alarmed)
    }
    console.log(`demo: first reaction at sample ${found?.alarmAt}, changeOnset places the onset at ${found?.onsetAt} (installation at ${34 * SCALE})`);
    expect(found?.alarmAt).toBeGreaterThanOrEqual(34 * SCALE);
    expect(found?.onsetAt).toBe(34 * SCALE);
  });
});
