import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { SampleError, finiteSamples, isNumber, requireNumber, requireNumbers, sampleWithin } from "@leeway/core";
import { expectLeewayError } from "../support/errors.js";

const notNumbers: [unknown, string][] = [
  ["5", '"5" (string)'],
  [null, "null (null)"],
  [undefined, "undefined (undefined)"],
  [[7], "an array of length 1 (array)"],
  [true, "true (boolean)"],
  [5n, "5n (bigint)"],
  [{ valueOf: () => 3 }, "an object (object)"],
];

describe("sample checks (no sample is coerced to a number)", () => {
  it("isNumber is true exactly for values of type number, NaN and ±Infinity included", () => {
    expect([isNumber(5), isNumber(Number.NaN), isNumber(-Infinity), isNumber("5"), isNumber(null)]).toEqual([true, true, true, false, false]);
    fc.assert(fc.property(fc.anything(), (x) => isNumber(x) === (typeof x === "number")));
  });

  it("requireNumber passes every number (the nonFinite policy decides about NaN) and refuses every other type with E_SAMPLE naming the parameter and the type", () => {
    expect(requireNumber("Moments", "x", 2.5)).toBe(2.5);
    expect(requireNumber("Moments", "x", Number.NaN)).toBeNaN();
    for (const [value, shown] of notNumbers) {
      const error = expectLeewayError(() => requireNumber("Moments", "x", value), "E_SAMPLE", "Moments: x must be a number", `got ${shown}`);
      expect(error).toBeInstanceOf(SampleError);
    }
  });

  it("requireNumbers passes typed arrays and arrays of numbers, refuses the first non-number element by index and a wrong length with E_DIMENSION", () => {
    const f32 = new Float32Array(3);
    expect(requireNumbers("AE", "x", f32, 3)).toBe(f32);
    expect(requireNumbers("AE", "x", [1, Number.NaN]).length).toBe(2);
    expectLeewayError(() => requireNumbers("AE", "x", [1, "2"]), "E_SAMPLE", "AE: x[1] must be a number", '"2" (string)');
    expectLeewayError(() => requireNumbers("AE", "x", [1, null, 3]), "E_SAMPLE", "x[1]", "null");
    expectLeewayError(() => requireNumbers("AE", "x", "12"), "E_SAMPLE", "x must be a Float64Array, a Float32Array or an array of numbers");
    expectLeewayError(() => requireNumbers("AE", "x", new Int32Array(2)), "E_SAMPLE", "Int32Array");
    expectLeewayError(() => requireNumbers("AE", "x", [1, 2], 3), "E_DIMENSION", "length 3", "length 2");
  });

  it("finiteSamples copies a series of finite numbers and refuses non-numbers (E_SAMPLE, by index) and NaN/±Infinity (E_NON_FINITE)", () => {
    const given = [1, 2.5, -3];
    const copy = finiteSamples("mannKendall", "values", given);
    expect(Array.from(copy)).toEqual(given);
    copy[0] = 9;
    expect(given[0]).toBe(1);
    expect(Array.from(finiteSamples("f", "values", Float32Array.of(0.5)))).toEqual([0.5]);
    for (const [value, shown] of notNumbers) expectLeewayError(() => finiteSamples("f", "values", [1, value]), "E_SAMPLE", "f: values[1] must be a finite number", `got ${shown}`);
    expectLeewayError(() => finiteSamples("f", "values", [1, Number.NaN]), "E_NON_FINITE", "values[1]", "NaN");
    expectLeewayError(() => finiteSamples("f", "values", "12"), "E_SAMPLE", "values must be", "(string)");
    expectLeewayError(() => finiteSamples("f", "values", new Int16Array(2)), "E_SAMPLE", "Int16Array");
  });

  it("sampleWithin passes finite numbers up to the limit and refuses the rest: beyond the range E_SAMPLE stating it, NaN/±Infinity E_NON_FINITE", () => {
    expect(sampleWithin("Cusum", "x", 3, 1e150)).toBe(3);
    expect(sampleWithin("Cusum", "x", -1e150, 1e150)).toBe(-1e150);
    expectLeewayError(() => sampleWithin("Cusum", "x", 1e200, 1e150), "E_SAMPLE", "Cusum: x must be a finite number in [-1e+150, 1e+150], got 1e+200");
    expectLeewayError(() => sampleWithin("Cusum", "x", Infinity, 1e150), "E_NON_FINITE", "Infinity");
    expectLeewayError(() => sampleWithin("Cusum", "x", "3", 1e150), "E_SAMPLE", '"3" (string)');
  });
});
