import { describe, expect, it } from "vitest";
import { acceptSample, runBatch } from "../../packages/stats/src/samples.js";
import { expectLeewayError } from "../support/errors.js";

describe("sample policy helpers", () => {
  it("acceptSample takes finite samples, refuses others under refuse and declines them under skip", () => {
    expect(acceptSample("Thing", "refuse", 1.5)).toBe(true);
    expect(acceptSample("Thing", "skip", Number.NaN)).toBe(false);
    expectLeewayError(() => acceptSample("Thing", "refuse", -Infinity), "E_NON_FINITE", "Thing", "x", "-Infinity");
  });

  it("runBatch hands each non-finite sample to the single-sample path and continues after it", () => {
    const taken: number[] = [];
    const odd: number[] = [];
    const run = (xs: Float64Array): number => {
      let i = 0;
      for (; i < xs.length && Number.isFinite(xs[i] as number); i++) taken.push(xs[i] as number);
      return i;
    };
    runBatch(Float64Array.from([1, Number.NaN, 2, 3, Infinity, Infinity, 4]), run, (x) => odd.push(x));
    expect(taken).toEqual([1, 2, 3, 4]);
    expect(odd).toEqual([Number.NaN, Infinity, Infinity]);
  });
});
