import { describe, expect, it } from "vitest";
import { cusumArl } from "@leeway/change";
import { expectLeewayError } from "../support/errors.js";

describe("cusumArl", () => {
  it("b² at zero drift, symmetric in the shift when two-sided, and decreasing in the shift", () => {
    expect(cusumArl(0, 3, 0, { sides: 1 })).toBeCloseTo((3 + 1.166) ** 2, 12);
    expect(cusumArl(0.5, 4, 0.7)).toBeCloseTo(cusumArl(0.5, 4, -0.7), 12);
    expect(cusumArl(0.5, 4, 1)).toBeLessThan(cusumArl(0.5, 4, 0.5));
  });

  it("refuses bad arguments with E_OPTION naming them", () => {
    expectLeewayError(() => cusumArl(-1, 4, 0), "E_OPTION", "k");
    expectLeewayError(() => cusumArl(0.5, 0, 0), "E_OPTION", "h");
    expectLeewayError(() => cusumArl(0.5, 4, Number.NaN), "E_OPTION", "shift");
    expectLeewayError(() => cusumArl(0.5, 4, 0, { sides: 3 as 1 }), "E_OPTION", "sides");
  });
});
