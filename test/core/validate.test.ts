import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  booleanOption,
  finiteArray,
  finiteNumber,
  integerInRange,
  nonFiniteOption,
  nonNegativeInteger,
  nonNegativeNumber,
  numberInRange,
  oneOf,
  optionsObject,
  positiveInteger,
  positiveNumber,
  requireFinite,
  seedOption,
} from "@leeway/core";
import { expectLeewayError } from "../support/errors.js";

describe("option validation", () => {
  it("accepts good values unchanged", () => {
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), (x) => {
        expect(finiteNumber("C", "x", x)).toBe(x);
      }),
    );
    expect(positiveNumber("C", "x", 1e-300)).toBe(1e-300);
    expect(nonNegativeNumber("C", "x", 0)).toBe(0);
    expect(numberInRange("C", "p", 0.5, { min: 0, max: 1, minExclusive: true, maxExclusive: true })).toBe(0.5);
    expect(integerInRange("C", "n", 3, 1, 3)).toBe(3);
    expect(positiveInteger("C", "n", 1)).toBe(1);
    expect(nonNegativeInteger("C", "n", 0)).toBe(0);
    expect(oneOf("C", "mode", "b", ["a", "b"] as const)).toBe("b");
    expect(booleanOption("C", "flag", false)).toBe(false);
    expect(seedOption("C", "seed", "x")).toBe("x");
    expect(Array.from(finiteArray("C", "xs", [1, 2, 3], { exactly: 3 }))).toEqual([1, 2, 3]);
    expect(nonFiniteOption("C", undefined)).toBe("refuse");
    expect(nonFiniteOption("C", "skip")).toBe("skip");
    expect(requireFinite("C", "x", 2)).toBe(2);
  });

  it("refuses bad values with E_OPTION naming the option and the value", () => {
    expectLeewayError(() => finiteNumber("Cusum", "k", Number.NaN), "E_OPTION", "Cusum", "option k", "NaN", "finite number");
    expectLeewayError(() => finiteNumber("Cusum", "k", "1"), "E_OPTION", 'got "1"');
    expectLeewayError(() => positiveNumber("Cusum", "h", 0), "E_OPTION", "option h", "> 0", "got 0");
    expectLeewayError(() => nonNegativeNumber("Cusum", "k", -1), "E_OPTION", ">= 0", "got -1");
    expectLeewayError(() => numberInRange("Ewma", "lambda", 0, { min: 0, max: 1, minExclusive: true }), "E_OPTION", "(0, 1]", "got 0");
    expectLeewayError(() => numberInRange("Ewma", "lambda", 1, { min: 0, max: 1, maxExclusive: true }), "E_OPTION", "[0, 1)");
    expectLeewayError(() => integerInRange("W", "width", 2.5, 1, 10), "E_OPTION", "integer in [1, 10]", "2.5");
    expectLeewayError(() => positiveInteger("W", "width", 0), "E_OPTION", "[1, ");
    expectLeewayError(() => nonNegativeInteger("W", "burnIn", -1), "E_OPTION", "[0, ");
    expectLeewayError(() => oneOf("AE", "activation", "relu", ["sigmoid", "tanh"]), "E_OPTION", '"sigmoid", "tanh"', '"relu"');
    expectLeewayError(() => booleanOption("C", "twoSided", 1), "E_OPTION", "true or false");
    expectLeewayError(() => seedOption("C", "seed", ""), "E_OPTION", "option seed");
    expectLeewayError(() => finiteArray("C", "xs", [1, Number.NaN]), "E_OPTION", "xs[1]", "NaN");
    expectLeewayError(() => finiteArray("C", "xs", [1], { exactly: 2 }), "E_OPTION", "exactly 2");
    expectLeewayError(() => finiteArray("C", "xs", [1], { atLeast: 2 }), "E_OPTION", "at least 2");
    expectLeewayError(() => finiteArray("C", "xs", [1, 2], { atMost: 1 }), "E_OPTION", "at most 1");
    expectLeewayError(() => finiteArray("C", "xs", "abc"), "E_OPTION", "array of finite numbers");
    expectLeewayError(() => nonFiniteOption("C", "drop"), "E_OPTION", "nonFinite", '"refuse", "skip"');
    expectLeewayError(() => requireFinite("Moments", "x", Infinity), "E_NON_FINITE", "Moments", "Infinity");
  });

  it("refuses unknown option keys so that a misspelt option is not a silent default", () => {
    expect(optionsObject("Cusum", { k: 1 }, ["k", "h"])).toEqual({ k: 1 });
    expect(optionsObject("Cusum", undefined, ["k"])).toEqual({});
    expectLeewayError(() => optionsObject("Cusum", { hh: 1 }, ["k", "h"]), "E_OPTION", "option hh", "k, h");
    expectLeewayError(() => optionsObject("Cusum", 5, ["k"]), "E_OPTION", "options object");
  });
});
