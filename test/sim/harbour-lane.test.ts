import { describe, expect, it } from "vitest";
import { harbourLane, truthEvents } from "@leeway/sim";
import { expectLeewayError } from "../support/errors.js";

describe("harbourLane", () => {
  it("seven days at one sample per second by default: 604 800 samples, events at hours 34, 72 and 134", () => {
    const s = harbourLane();
    expect(s.length).toBe(604_800);
    expect(s.events.map((e) => [e.type, e.start, e.end])).toEqual([
      ["environment-shift", 34 * 3600, 604_800],
      ["degradation", 72 * 3600, 604_800],
      ["fault", 134 * 3600, 135 * 3600],
    ]);
    expect(s.schedule.slice(0, 5).map((x) => [x.start, x.mode, x.rpm])).toEqual([
      [0, "low", 990],
      [6 * 3600, "mid", 1485],
      [17 * 3600, "high", 2970],
      [21 * 3600, "mid", 1485],
      [24 * 3600, "low", 990],
    ]);
  });

  it("scale shrinks every time to round(hour·scale); the clog stays at least one sample", () => {
    const s = harbourLane({ scale: 1 });
    expect(s.length).toBe(168);
    expect(truthEvents(s).filter((e) => e.type === "fault").map((e) => [e.start, e.end])).toEqual([[134, 135]]);
    expect(harbourLane({ scale: 2.5 }).events.map((e) => e.start)).toEqual([85, 180, 335]);
  });

  it("refuses scales outside [1, 3600] and unknown options", () => {
    expectLeewayError(() => harbourLane({ scale: 0.5 }), "E_OPTION", "scale", "[1, 3600]");
    expectLeewayError(() => harbourLane({ scale: 7200 }), "E_OPTION", "scale");
    expectLeewayError(() => harbourLane({ length: 100 } as never), "E_OPTION", "length");
  });
});
