import { describe, expect, it } from "vitest";
import { ewmaArl } from "@leeway/change";
import { normalCdf } from "@leeway/stats";
import { expectLeewayError } from "../support/errors.js";

describe("ewmaArl", () => {
  it("λ = 1 equals the Shewhart 1/(Φ(−L − δ) + 1 − Φ(L − δ)) exactly", () => {
    for (const shift of [0, 0.5, 2]) {
      const p = normalCdf(-3 - shift) + 1 - normalCdf(3 - shift);
      expect(ewmaArl(1, 3, shift)).toBeCloseTo(1 / p, 8);
    }
  });

  it("converges as the chain grows (201 and 401 states agree within 0.5 %)", () => {
    const coarse = ewmaArl(0.1, 2.814, 0.5, { states: 201 });
    const fine = ewmaArl(0.1, 2.814, 0.5);
    expect(Math.abs(coarse / fine - 1)).toBeLessThan(0.005);
  });

  it("refuses bad arguments with E_OPTION naming them", () => {
    expectLeewayError(() => ewmaArl(0, 3, 0), "E_OPTION", "lambda");
    expectLeewayError(() => ewmaArl(0.1, -3, 0), "E_OPTION", "L");
    expectLeewayError(() => ewmaArl(0.1, 3, Infinity), "E_OPTION", "shift");
    expectLeewayError(() => ewmaArl(0.1, 3, 0, { states: 2 }), "E_OPTION", "states");
  });
});
