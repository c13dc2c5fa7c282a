import { describe, expect, it } from "vitest";
import { defineScenario, truthEvents } from "@leeway/sim";

describe("truthEvents", () => {
  it("lists mode changes (label = mode, spanning the segment) and scheduled events in start order with their causes", () => {
    const s = defineScenario({
      length: 100,
      schedule: [
        { start: 0, mode: "low", rpm: 990 },
        { start: 40, mode: "high", rpm: 2970 },
        { start: 70, mode: "low", rpm: 990 },
      ],
      events: [
        { type: "fault", start: 50, end: 55, fault: "clog" },
        { type: "environment-shift", start: 40, noiseFactor: 2, label: "compressor" },
        { type: "degradation", start: 10, end: 90 },
      ],
    });
    expect(truthEvents(s)).toEqual([
      { id: "degradation-1", type: "degradation", cause: "degradation", start: 10, end: 90, label: "outer-race defect" },
      { id: "mode-change-1", type: "mode-change", cause: "concept-drift", start: 40, end: 70, label: "high" },
      { id: "environment-shift-1", type: "environment-shift", cause: "concept-drift", start: 40, end: 100, label: "compressor" },
      { id: "fault-1", type: "fault", cause: "anomaly", start: 50, end: 55, label: "clog" },
      { id: "mode-change-2", type: "mode-change", cause: "concept-drift", start: 70, end: 100, label: "low" },
    ]);
  });

  it("a single-segment schedule without events has no events", () => {
    expect(truthEvents(defineScenario({ length: 10, schedule: [{ start: 0, mode: "mid", rpm: 1485 }] }))).toEqual([]);
  });
});
