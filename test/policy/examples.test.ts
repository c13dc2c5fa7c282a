import { describe, expect, it } from "vitest";
import { DecisionEngine } from "@leeway/policy";
import { BlockTrend } from "../../packages/policy/src/block-trend.js";
import { SettlingWindow } from "../../packages/policy/src/settling-window.js";

// The @example of every exported class, run as written.
describe("doc examples", () => {
  it("DecisionEngine", () => {
    const engine = new DecisionEngine({ commissioning: 50, calibration: 50, targetArl0: 500, seed: 1 });
    let d = engine.observeScores(1);
    for (let i = 1; i < 100; i++) d = engine.observeScores(1 + 0.1 * Math.sin(i));
    expect([d.phase, engine.observeScores(1.05).action]).toEqual(["commissioning", "learn"]);
    expect(engine.phase).toBe("watching");
  });

  it("FeatureModel", () => {
    const engine = new DecisionEngine({ inputs: 8, hidden: 4, commissioning: 20, calibration: 20, seed: 1 });
    for (let i = 0; i < 20; i++) engine.observe(Float64Array.from({ length: 8 }, (_, j) => 1 + 0.01 * Math.sin(i + j)));
    expect([engine.model?.lineageSize, engine.model?.pool.size]).toEqual([1, 1]);
  });

  it("BlockTrend", () => {
    const t = new BlockTrend(10, 50);
    for (let i = 0; i < 500; i++) t.observe(i * 0.001);
    expect(t.evidence.z > 3).toBe(true);
  });

  it("SettlingWindow", () => {
    const w = new SettlingWindow(40);
    for (let i = 0; i < 40; i++) w.push(2 + (i % 2) * 0.1, 2, 2);
    expect(Math.round(w.check().activeLevel * 100) / 100).toBe(2.05);
  });
});
