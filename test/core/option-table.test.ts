import { describe, expect, it } from "vitest";
import { optionTable } from "@leeway/core";
import { expectLeewayError } from "../support/errors.js";

const table = optionTable("Thing", {
  window: { kind: "span", default: "10m", atLeast: 20, min: 2, max: 1_000_000, doc: "samples in the window" },
  k: { kind: "number", default: 0.5, min: 0, maxExclusive: true, max: 10, unit: "σ", doc: "reference value" },
  runs: { kind: "integer", default: 5, min: 1, max: 100, unit: "samples", doc: "a run" },
  side: { kind: "choice", default: "both", choices: ["up", "down", "both"], doc: "which side" },
  on: { kind: "boolean", default: true, doc: "switch" },
  seed: { kind: "seed", default: 0, doc: "seed" },
});

describe("optionTable", () => {
  it("fills every default; a span's default is its duration at the sample period, never below its floor", () => {
    expect(table.defaults()).toEqual({ window: 600, k: 0.5, runs: 5, side: "both", on: true, seed: 0 });
    expect(table.defaults({ samplePeriod: 10 }).window).toBe(60);
    expect(table.defaults({ samplePeriod: 600 }).window).toBe(20);
  });

  it("takes a span as a count of samples or as a duration at the sample period", () => {
    expect(table.resolve({ window: 75 }).window).toBe(75);
    expect(table.resolve({ window: "2m" }, { samplePeriod: 10 }).window).toBe(12);
    expect(table.resolve({ window: "1.5h" }).window).toBe(5400);
  });

  it("refuses each bad value with E_OPTION naming the option, the value and what is allowed", () => {
    expectLeewayError(() => table.resolve({ window: "10 parsecs" }), "E_OPTION", "window", "10 parsecs", "duration");
    expectLeewayError(() => table.resolve({ window: "10s" }, { samplePeriod: 60 }), "E_OPTION", "window", "at 60 s per sample it is 0 samples");
    expectLeewayError(() => table.resolve({ window: 2.5 }), "E_OPTION", "window", "integer count");
    expectLeewayError(() => table.resolve({ k: 10 }), "E_OPTION", "k", "[0, 10)");
    expectLeewayError(() => table.resolve({ k: Number.NaN }), "E_OPTION", "k");
    expectLeewayError(() => table.resolve({ runs: 0 }), "E_OPTION", "runs", "[1, 100]");
    expectLeewayError(() => table.resolve({ side: "left" }), "E_OPTION", "side", '"up", "down", "both"');
    expectLeewayError(() => table.resolve({ on: 1 }), "E_OPTION", "on", "true or false");
    expectLeewayError(() => table.resolve({ seed: "" }), "E_OPTION", "seed");
  });

  it("describes itself as plain rows in declaration order", () => {
    const rows = table.describe();
    expect(rows.map((r) => r.name)).toEqual(["window", "k", "runs", "side", "on", "seed"]);
    expect(rows[0]).toMatchObject({ kind: "span", default: "10m", min: 2, unit: "samples or a duration" });
    expect(rows[3]).toMatchObject({ choices: ["up", "down", "both"], min: null });
    expect(JSON.parse(JSON.stringify(rows))).toEqual(rows);
  });
});
