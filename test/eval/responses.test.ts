import { describe, expect, it } from "vitest";
import { findEpisodes, findResponses, responseClass, RESPONSE_ACTIONS } from "@leeway/eval";
import { ACTIONS, CAUSES } from "@leeway/policy";
import { decisions, timelineOf } from "./fixtures.js";

describe("responseClass", () => {
  it("retrain and switch-mode claim concept drift whatever their cause", () => {
    for (const cause of CAUSES) {
      expect(responseClass("retrain", cause)).toBe("concept-drift");
      expect(responseClass("switch-mode", cause)).toBe("concept-drift");
    }
  });

  it("alarm and await-confirmation claim their cause; known-mode is drift; other causes claim nothing", () => {
    for (const action of ["alarm", "await-confirmation"] as const) {
      expect(responseClass(action, "anomaly")).toBe("anomaly");
      expect(responseClass(action, "degradation")).toBe("degradation");
      expect(responseClass(action, "concept-drift")).toBe("concept-drift");
      expect(responseClass(action, "known-mode")).toBe("concept-drift");
      for (const cause of ["normal", "commissioning", "operator"] as const) expect(responseClass(action, cause)).toBeNull();
    }
  });

  it("learn and hold are never responses", () => {
    for (const action of ACTIONS.filter((a) => !RESPONSE_ACTIONS.includes(a))) for (const cause of CAUSES) expect(responseClass(action, cause)).toBeNull();
  });
});

describe("findEpisodes and findResponses", () => {
  it("an episode starts where the action or the cause changes, never in commissioning", () => {
    const t = timelineOf(
      decisions(20, [
        { from: 0, to: 4, action: "alarm", cause: "anomaly", phase: "commissioning" },
        { from: 4, to: 6, action: "alarm", cause: "anomaly" }, // continues a run begun in commissioning: not a new episode
        { from: 8, to: 10, action: "alarm", cause: "anomaly" },
        { from: 10, to: 12, action: "alarm", cause: "degradation" },
        { from: 14, action: "hold", cause: "anomaly" },
        { from: 15, action: "alarm", cause: "operator" },
      ]),
    );
    expect(findEpisodes(t).map((e) => [e.position, e.action, e.cause])).toEqual([
      [8, "alarm", "anomaly"],
      [10, "alarm", "degradation"],
      [15, "alarm", "operator"],
    ]);
    expect(findResponses(findEpisodes(t)).map((r) => r.position)).toEqual([8, 10]);
  });

  it("a retrain after another response is a response of its own", () => {
    const t = timelineOf(
      decisions(10, [
        { from: 2, action: "await-confirmation", cause: "concept-drift" },
        { from: 4, action: "alarm", cause: "anomaly" },
        { from: 6, action: "retrain", cause: "operator" },
      ]),
    );
    expect(findResponses(findEpisodes(t)).map((r) => [r.position, r.completedAt])).toEqual([
      [2, null],
      [4, null],
      [6, null],
    ]);
  });
});
