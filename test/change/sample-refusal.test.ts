import { describe, expect, it } from "vitest";
import { Adwin, Cusum, EwmaChart, PageHinkley, restoreChangeTest, SlidingKsTest, type ChangeTest } from "@leeway/change";
import { expectLeewayError } from "../support/errors.js";

const makers: [string, () => ChangeTest][] = [
  ["Cusum", () => new Cusum({ mean: 0, sigma: 1, nonFinite: "skip" })],
  ["Cusum (burn-in)", () => new Cusum({ burnIn: 4, nonFinite: "skip" })],
  ["EwmaChart", () => new EwmaChart({ mean: 0, sigma: 1, nonFinite: "skip" })],
  ["PageHinkley", () => new PageHinkley({ alarmLevel: 5, direction: "both", nonFinite: "skip" })],
  ["Adwin", () => new Adwin({ nonFinite: "skip" })],
  ["SlidingKsTest", () => new SlidingKsTest({ recentSize: 8, referenceSize: 8, nonFinite: "skip" })],
];
const arithmetic = makers.filter(([name]) => name !== "SlidingKsTest");

describe("change tests and bad samples (common practice, no source)", () => {
  it.each(makers)("%s refuses non-numbers with E_SAMPLE naming x and the type, under skip too, and keeps its state", (_, make) => {
    const test = make();
    test.observe(0.5);
    const before = JSON.stringify(test.snapshot());
    for (const [value, type] of [[null, "null"], ["5", "string"], [[7], "array"], [{}, "object"], [undefined, "undefined"], [true, "boolean"]] as const) {
      expectLeewayError(() => test.observe(value as never), "E_SAMPLE", "x", type);
    }
    expectLeewayError(() => test.scan([1, 2] as never), "E_SAMPLE", "xs", "array");
    expect(JSON.stringify(test.snapshot())).toBe(before);
  });

  it.each(arithmetic)("%s refuses finite samples beyond ±1e100 with E_SAMPLE in observe and scan, and its snapshot stays restorable", (_, make) => {
    const test = make();
    test.scan(Float64Array.from([0.1, -0.2, 0.3, 0.05, 0.2]));
    const before = JSON.stringify(test.snapshot());
    expectLeewayError(() => test.observe(1e308), "E_SAMPLE", "x", "1e+100", "1e+308");
    expectLeewayError(() => test.scan(Float64Array.from([0.1, -1e200])), "E_SAMPLE", "xs[1]", "-1e+200");
    expect(JSON.stringify(restoreChangeTest(JSON.parse(before)).snapshot())).toBe(before);
    const after = test.snapshot();
    expect(() => restoreChangeTest(JSON.parse(JSON.stringify(after)))).not.toThrow();
  });

  it.each(arithmetic)("%s at the edge of the range (±1e100, alternating) keeps finite readings and a restorable snapshot", (_, make) => {
    const test = make();
    for (let i = 0; i < 300; i++) {
      const reading = test.observe(i % 2 === 0 ? 1e100 : -1e100);
      expect(Number.isFinite(reading.statistic)).toBe(true);
    }
    const copy = restoreChangeTest(JSON.parse(JSON.stringify(test.snapshot())));
    expect(copy.observe(1e100)).toEqual(test.observe(1e100));
  });
});
