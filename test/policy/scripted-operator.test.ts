import { describe, expect, it } from "vitest";
import { DecisionEngine } from "@leeway/policy";
import { ScriptedOperator } from "@leeway/policy";
import { scoreRows, SHORT_ENGINE } from "../cli/streams.js";

describe("ScriptedOperator", () => {
  it("acknowledges an alarm after it stayed latched for the given number of samples", () => {
    const engine = new DecisionEngine(SHORT_ENGINE);
    const operator = new ScriptedOperator(engine, { acknowledgeAfter: 7, confirmAfter: null });
    let latchedRun = 0;
    let longest = 0;
    for (const row of scoreRows(1500, 11, 30, 700)) {
      const d = engine.observeScores(row.live, [row.ref]);
      latchedRun = d.phase === "latched" ? latchedRun + 1 : 0;
      longest = Math.max(longest, latchedRun);
      operator.after(d);
    }
    expect(operator.actions.length).toBeGreaterThan(0);
    expect(operator.actions.every((a) => a.action === "acknowledge")).toBe(true);
    expect(longest).toBe(7); // never latched longer than the operator waits
  });
  it("does nothing when both waits are null", () => {
    const engine = new DecisionEngine(SHORT_ENGINE);
    const operator = new ScriptedOperator(engine, { acknowledgeAfter: null, confirmAfter: null });
    let latched = 0;
    for (const row of scoreRows(1200, 11, 30, 700)) {
      const d = engine.observeScores(row.live, [row.ref]);
      if (d.phase === "latched") latched++;
      operator.after(d);
    }
    expect(latched).toBeGreaterThan(7);
    expect(operator.actions).toEqual([]);
  });
});
