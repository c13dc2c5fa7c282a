import { describe, expect, it } from "vitest";
import { formatDuration, formatTime, timeBasis, timeSeconds, timeTicks } from "../../../packages/cli/src/report/time-axis.js";

describe("report time axis", () => {
  it("reads ISO dates as clock time and numbers as seconds (epoch seconds above 10^9)", () => {
    expect(timeSeconds("2026-03-02T10:04:00Z")).toEqual({ seconds: Date.UTC(2026, 2, 2, 10, 4) / 1000, clock: true });
    expect(timeSeconds(30)).toEqual({ seconds: 30, clock: false });
    expect(timeSeconds(1_772_445_840)).toEqual({ seconds: 1_772_445_840, clock: true });
    expect(timeSeconds("pump on")).toBeNull();
  });
  it("interpolates between known points, and falls back to a sample period or sample numbers", () => {
    const clock = timeBasis([[0, "2026-03-02T00:00:00Z"], [360, "2026-03-02T01:00:00Z"]], null);
    expect(clock.kind).toBe("clock");
    expect(clock.secondsAt(180) - clock.secondsAt(0)).toBe(1800);
    expect(clock.indexAt(clock.secondsAt(0) + 900)).toBe(90);
    expect(timeBasis([], 10).secondsAt(8640)).toBe(86400);
    // Times that run backwards are not used.
    expect(timeBasis([[0, 50], [10, 40]], null).kind).toBe("samples");
  });
  it("ticks at round steps; times and durations in words with their units", () => {
    expect(timeTicks(0, 7 * 86400, 7)).toEqual([0, 1, 2, 3, 4, 5, 6, 7].map((d) => d * 86400));
    expect(timeTicks(30, 300, 5)).toEqual([60, 120, 180, 240, 300]);
    expect(formatTime("elapsed", 34 * 3600 + 300, false)).toBe("day 2 10:05");
    expect(formatTime("clock", Date.UTC(2026, 2, 2, 10, 4, 7) / 1000, true)).toBe("2026-03-02 10:04:07");
    expect(formatTime("samples", 12000, false)).toBe("sample 12 000");
    expect([formatDuration(45), formatDuration(720), formatDuration(5400), formatDuration(3 * 86400)]).toEqual(["45 s", "12 min", "1.5 h", "3 days"]);
  });
});
