import { describe, expect, it } from "vitest";
import { scaleInto, scalingOption, standardizeFrom } from "../../packages/pool/src/scaling.js";
import { expectLeewayError } from "../support/errors.js";

describe("scaling", () => {
  it("standardizeFrom gives per-feature mean and population sd, with scale 1 for a constant feature", () => {
    const { offset, scale } = standardizeFrom([Float64Array.of(1, 5), Float64Array.of(3, 5)], 2);
    expect(Array.from(offset)).toEqual([2, 5]);
    expect(Array.from(scale)).toEqual([1, 1]);
    const wide = standardizeFrom([Float64Array.of(0), Float64Array.of(4)], 1);
    expect(wide.scale[0]).toBe(2);
  });

  it("scaleInto writes (x − offset)/scale and reports non-finite values", () => {
    const z = new Float64Array(2);
    const given = scalingOption("T", { offset: [1, 2], scale: [2, 4] }, 2);
    expect(scaleInto("T", "x", [3, 6], z, given, true)).toBe(true);
    expect(Array.from(z)).toEqual([1, 1]);
    expect(scaleInto("T", "x", [Number.NaN, 0], z, given, false)).toBe(false);
    expectLeewayError(() => scaleInto("T", "x", [0, Infinity], z, given, true), "E_NON_FINITE", "x[1]", "Infinity");
    expectLeewayError(() => scaleInto("T", "x", [0], z, given, true), "E_DIMENSION", "length 2", "length 1");
  });

  it("scalingOption refuses anything but none, standardize or a valid { offset, scale }", () => {
    expect(scalingOption("T", undefined, 3).mode).toBe("none");
    expect(scalingOption("T", "standardize", 3)).toEqual({ mode: "standardize", offset: null, scale: null });
    expectLeewayError(() => scalingOption("T", [1, 2], 2), "E_OPTION", "scaling");
    expectLeewayError(() => scalingOption("T", { offset: [0, 0], scale: [1, -1] }, 2), "E_OPTION", "scaling.scale[1]", "-1");
  });
});
