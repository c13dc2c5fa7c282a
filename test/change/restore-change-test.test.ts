import { describe, expect, it } from "vitest";
import { Adwin, Cusum, EwmaChart, SlidingKsTest, PageHinkley, restoreChangeTest, type ChangeTest } from "@leeway/change";
import { expectLeewayError, throughJson } from "../support/errors.js";

describe("restoreChangeTest", () => {
  const tests: ChangeTest[] = [
    new Cusum({ mean: 0, sigma: 1 }),
    new PageHinkley({ alarmLevel: 5 }),
    new EwmaChart({ mean: 0, sigma: 1 }),
    new Adwin(),
    new SlidingKsTest({ recentSize: 8, referenceSize: 8 }),
  ];
  it("dispatches on kind to the right class, which continues identically", () => {
    const xs = Float64Array.from({ length: 100 }, (_, i) => Math.sin(i / 3) + (i > 60 ? 2 : 0));
    for (const test of tests) {
      test.scan(xs.subarray(0, 50));
      const copy = restoreChangeTest(throughJson(test.snapshot()));
      expect(copy.name).toBe(test.name);
      expect(copy.constructor).toBe(test.constructor);
      for (let i = 50; i < xs.length; i++) expect(copy.observe(xs[i] as number)).toEqual(test.observe(xs[i] as number));
    }
  });

  it("refuses an unknown kind with E_SNAPSHOT naming the kinds it knows", () => {
    expectLeewayError(() => restoreChangeTest({ kind: "leeway.change.other", version: 1, state: {} }), "E_SNAPSHOT", "leeway.change.cusum");
    expectLeewayError(() => restoreChangeTest(null), "E_SNAPSHOT", "kind");
  });
});
