import { describe, expect, it } from "vitest";
import { acceptSample, MAX_SAMPLE_MAGNITUDE, requireBatch } from "@leeway/stats";
import { runBatch } from "../../packages/stats/src/samples.js";
import { expectLeewayError } from "../support/errors.js";

describe("sample policy helpers", () => {
  it("acceptSample takes finite samples, refuses others under refuse and declines them under skip", () => {
    expect(acceptSample("Thing", "x", "refuse", 1.5)).toBe(true);
    expect(acceptSample("Thing", "x", "skip", Number.NaN)).toBe(false);
    expectLeewayError(() => acceptSample("Thing", "x", "refuse", -Infinity), "E_NON_FINITE", "Thing", "x", "-Infinity");
  });

  it("acceptSample refuses every non-number with E_SAMPLE naming the parameter and the type, under skip too", () => {
    for (const policy of ["refuse", "skip"] as const) {
      expectLeewayError(() => acceptSample("Thing", "x", policy, null), "E_SAMPLE", "Thing", "x", "null");
      expectLeewayError(() => acceptSample("Thing", "x", policy, "5"), "E_SAMPLE", "x", "string");
      expectLeewayError(() => acceptSample("Thing", "x", policy, [7]), "E_SAMPLE", "x", "array");
      expectLeewayError(() => acceptSample("Thing", "x", policy, { x: 1 }), "E_SAMPLE", "x", "object");
      expectLeewayError(() => acceptSample("Thing", "x", policy, undefined), "E_SAMPLE", "x", "undefined");
    }
  });

  it("acceptSample refuses a finite sample beyond the stated limit under skip too, and takes one at the limit", () => {
    expect(acceptSample("Thing", "x", "refuse", -MAX_SAMPLE_MAGNITUDE, MAX_SAMPLE_MAGNITUDE)).toBe(true);
    for (const policy of ["refuse", "skip"] as const) {
      expectLeewayError(() => acceptSample("Thing", "x", policy, 1e101, MAX_SAMPLE_MAGNITUDE), "E_SAMPLE", "x", "1e+100", "1e+101");
    }
  });

  it("requireBatch takes a Float64Array only", () => {
    const xs = new Float64Array(2);
    expect(requireBatch("Thing", xs)).toBe(xs);
    expectLeewayError(() => requireBatch("Thing", [1, 2]), "E_SAMPLE", "Thing", "xs", "array");
    expectLeewayError(() => requireBatch("Thing", new Float32Array(2), "weights"), "E_SAMPLE", "weights", "Float32Array");
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
