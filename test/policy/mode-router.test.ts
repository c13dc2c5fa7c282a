import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { DecisionEngine, ModeRouter, type DecisionEngineOptions } from "@leeway/policy";

const options = (mode: string): DecisionEngineOptions => ({ inputs: 4, hidden: 3, members: 2, commissioning: 40, calibration: 40, targetArl0: 500, calibrationReplicates: 10, seed: `t/${mode}` });

function stream(n: number): { x: Float64Array; mode: string }[] {
  const rng = new RandomSource(3);
  return Array.from({ length: n }, (_, i) => {
    const mode = ["low", "mid", "high"][Math.floor(i / 25) % 3] as string;
    const level = mode === "low" ? 0.2 : mode === "mid" ? 0.5 : 0.9;
    return { x: Float64Array.from({ length: 4 }, (_, b) => level + 0.1 * b + 0.02 * rng.normal()), mode };
  });
}

describe("ModeRouter", () => {
  it("gives each mode's samples to that mode's engine: the same decisions as separate engines fed their own sub-streams", () => {
    const samples = stream(600);
    const router = new ModeRouter((mode) => new DecisionEngine(options(mode)));
    const routed = samples.map((s) => router.observe(s.x, s.mode));
    const alone = new Map<string, DecisionEngine>();
    samples.forEach((s, i) => {
      if (!alone.has(s.mode)) alone.set(s.mode, new DecisionEngine(options(s.mode)));
      const d = alone.get(s.mode)!.observe(s.x);
      const r = routed[i]!;
      expect(r.index).toBe(i);
      expect([r.action, r.cause, r.phase]).toEqual([d.action, d.cause, d.phase]);
      expect(r.evidence.liveScore).toBe(d.evidence.liveScore);
      expect(r.evidence.mode).toBe(s.mode);
      expect(r.evidence.modeIndex).toBe(d.index);
    });
    expect(router.modes).toEqual(["low", "mid", "high"]);
    expect(router.engine("mid")?.index).toBe(199);
  });
  it("records the scripted operators' actions with stream indices and modes", () => {
    const router = new ModeRouter((mode) => new DecisionEngine(options(mode)), { acknowledgeAfter: 2, confirmAfter: null });
    const samples = stream(400).map((s, i) => (i > 300 ? { x: s.x.map((v) => v * 20), mode: s.mode } : s));
    samples.forEach((s) => router.observe(s.x, s.mode));
    const actions = router.operatorActions();
    expect(actions.length).toBeGreaterThan(0);
    expect(actions.every((a) => a.index > 300 && a.action === "acknowledge")).toBe(true);
    expect(actions.map((a) => a.index)).toEqual([...actions.map((a) => a.index)].sort((a, b) => a - b));
  });
});
