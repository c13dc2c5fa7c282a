import { describe, expect, it } from "vitest";
import { Timeline } from "@leeway/eval";
import type { Decision } from "@leeway/policy";
import { expectLeewayError } from "../support/errors.js";
import { decisions } from "./fixtures.js";

describe("Timeline", () => {
  it("keeps action, cause, phase and both scores of every decision, past its initial capacity", () => {
    const ds = decisions(3000, [{ from: 1500, to: 1510, action: "alarm", cause: "anomaly", phase: "latched" }], Array.from({ length: 3000 }, (_, i) => i / 7));
    const t = new Timeline();
    for (const d of ds) t.record(d);
    expect(t.length).toBe(3000);
    for (const i of [0, 1023, 1024, 1505, 2999]) {
      const d = ds[i] as Decision;
      expect([t.actionAt(i), t.causeAt(i), t.phaseAt(i), t.liveScoreAt(i), t.referenceScoreAt(i)]).toEqual([d.action, d.cause, d.phase, d.evidence.liveScore, d.evidence.referenceScores[0]]);
    }
    expect(t.liveScores()).toHaveLength(3000);
    expect(t.referenceScores()[2999]).toBe(2999 / 7 + 1);
  });

  it("records a missing reference score as null", () => {
    const t = new Timeline();
    t.record({ index: 0, action: "learn", cause: "normal", phase: "watching", evidence: { liveScore: 0.5, referenceScores: [] } });
    expect(t.referenceScoreAt(0)).toBeNull();
  });

  it("refuses decisions outside the vocabulary and positions outside the timeline", () => {
    const t = new Timeline();
    const good: Decision = { index: 0, action: "learn", cause: "normal", phase: "watching", evidence: { liveScore: 1, referenceScores: [1] } };
    expectLeewayError(() => t.record({ ...good, action: "panic" as never }), "E_OPTION", "decision.action", "panic");
    expectLeewayError(() => t.record({ ...good, cause: "gremlins" as never }), "E_OPTION", "decision.cause", "gremlins");
    expectLeewayError(() => t.record({ ...good, phase: "asleep" as never }), "E_OPTION", "decision.phase", "asleep");
    expectLeewayError(() => t.record({ ...good, evidence: { liveScore: "1" as never, referenceScores: [] } }), "E_OPTION", "liveScore");
    expectLeewayError(() => t.record({ ...good, evidence: { liveScore: 1, referenceScores: 2 as never } }), "E_OPTION", "referenceScores");
    expect(t.length).toBe(0);
    t.record(good);
    expectLeewayError(() => t.actionAt(1), "E_OPTION", "position", "1");
  });
});
