import { describe, expect, it } from "vitest";
import { parseDuration, samplePeriodOption } from "@leeway/core";
import { expectLeewayError } from "../support/errors.js";

describe("parseDuration", () => {
  it("reads a number and a unit into seconds (common practice, no source)", () => {
    expect(parseDuration("250ms")).toBe(0.25);
    expect(parseDuration("90s")).toBe(90);
    expect(parseDuration("15m")).toBe(900);
    expect(parseDuration("15min")).toBe(900);
    expect(parseDuration("1.5h")).toBe(5400);
    expect(parseDuration("2d")).toBe(172800);
  });
  it("refuses anything else, naming the option", () => {
    for (const bad of ["", "15", "m", "-5m", "0s", "5 weeks", "1e3s"]) expectLeewayError(() => parseDuration(bad, "Engine", "settling"), "E_OPTION", "settling");
  });
  it("a sample period is seconds or a duration", () => {
    expect(samplePeriodOption("E", "samplePeriod", 0.5)).toBe(0.5);
    expect(samplePeriodOption("E", "samplePeriod", "10m")).toBe(600);
    expectLeewayError(() => samplePeriodOption("E", "samplePeriod", 0), "E_OPTION", "samplePeriod");
    expectLeewayError(() => samplePeriodOption("E", "samplePeriod", null), "E_OPTION", "samplePeriod");
  });
});
