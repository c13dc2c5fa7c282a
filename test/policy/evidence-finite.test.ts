import { describe, expect, it } from "vitest";
import { DecisionEngine, ModeRouter, type LimitDecisionEvidence } from "@leeway/policy";
import { harbourLane, MachineSimulator } from "@leeway/sim";
import { DEMO_LIMIT, DEMO_SCALE, demoEngineOptions } from "../../packages/cli/src/commands/demo.js";
import { nonFinitePaths } from "../fuzz/probe.js";

// Issue 16, item 5: a quantity not yet computed is absent or null, never NaN. The demo's own run (the
// Harbour Lane week at its default rate, one feature-mode engine per speed, the demo's scripted operator)
// goes through commissioning, calibration, watching, settling, retrains and latched alarms of every cause.
const SCALE = DEMO_SCALE;
describe("decisions over the demo scenario", () => {
  it("carry no NaN or ±Infinity anywhere in their evidence, and every degradation decision tells the time to the demo's limit", () => {
    const sim = new MachineSimulator(harbourLane({ scale: SCALE, seed: "harbour-lane" }));
    const router = new ModeRouter((mode) => new DecisionEngine(demoEngineOptions(SCALE, 256, `harbour-lane/${mode}`)), { acknowledgeAfter: 4, confirmAfter: 4 });
    const bad: string[] = [];
    const phases = new Set<string>();
    const limits = new Map<string, number>();
    let degradation = 0;
    let withoutLimit = 0;
    let disordered = 0;
    for (let s = sim.next(); s !== null; s = sim.next()) {
      const d = router.observe(s.spectrum, s.truth.mode);
      phases.add(d.phase);
      const paths = nonFinitePaths(d.evidence, `decision ${d.index}: evidence`);
      if (paths.length > 0 && bad.length < 5) bad.push(...paths);
      if (d.cause !== "degradation") continue;
      degradation++;
      const limit = d.evidence.limit as LimitDecisionEvidence | undefined;
      if (limit === undefined) {
        withoutLimit++;
        continue;
      }
      limits.set(limit.status, (limits.get(limit.status) ?? 0) + 1);
      if (limit.status === "estimated" && !(limit.earliest <= limit.expected && limit.expected <= limit.latest && limit.limit === DEMO_LIMIT)) disordered++;
    }
    console.log(`demo scenario at ${SCALE} samples per hour: ${degradation} degradation decisions; time to the limit ${[...limits].map(([k, n]) => `${k} ${n}`).join(", ")}`);
    expect(bad).toEqual([]);
    expect([...phases].sort()).toEqual(["commissioning", "latched", "retraining", "settling", "watching"]);
    expect(degradation).toBeGreaterThan(1000);
    // a degradation decision before the trend's first block has no line to extend: none here
    expect(withoutLimit).toBe(0);
    expect(limits.get("estimated")).toBeGreaterThan(0);
    expect(disordered).toBe(0);
  });
});
