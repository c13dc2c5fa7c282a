import { describe, expect, it } from "vitest";
import { cusumArl, ewmaArl, normalCdf } from "@leeway/change";
import { expectLeewayError } from "../support/errors.js";

describe("cusumArl and ewmaArl", () => {
  it("cusumArl: b² at zero drift, and symmetric in the shift when two-sided", () => {
    expect(cusumArl(0, 3, 0, { sides: 1 })).toBeCloseTo((3 + 1.166) ** 2, 12);
    expect(cusumArl(0.5, 4, 0.7)).toBeCloseTo(cusumArl(0.5, 4, -0.7), 12);
    expect(cusumArl(0.5, 4, 1)).toBeLessThan(cusumArl(0.5, 4, 0.5));
  });

  it("ewmaArl: λ = 1 equals the Shewhart 1/(Φ(−L − δ) + 1 − Φ(L − δ)) exactly", () => {
    for (const shift of [0, 0.5, 2]) {
      const p = normalCdf(-3 - shift) + 1 - normalCdf(3 - shift);
      expect(ewmaArl(1, 3, shift)).toBeCloseTo(1 / p, 8);
    }
  });

  it("ewmaArl converges as the chain grows (201 and 401 states agree within 0.5 %)", () => {
    const coarse = ewmaArl(0.1, 2.814, 0.5, { states: 201 });
    const fine = ewmaArl(0.1, 2.814, 0.5);
    expect(Math.abs(coarse / fine - 1)).toBeLessThan(0.005);
  });

  it("normalCdf matches Φ(−3) = 0.0013498980316301 and Φ(1.96) = 0.9750021048517795 (Abramowitz & Stegun, Table 26.1, from memory)", () => {
    expect(normalCdf(-3)).toBeCloseTo(0.0013498980316301, 15);
    expect(normalCdf(1.96)).toBeCloseTo(0.9750021048517795, 14);
  });

  it("refuse bad arguments with E_OPTION naming them", () => {
    expectLeewayError(() => cusumArl(-1, 4, 0), "E_OPTION", "k");
    expectLeewayError(() => cusumArl(0.5, 0, 0), "E_OPTION", "h");
    expectLeewayError(() => cusumArl(0.5, 4, Number.NaN), "E_OPTION", "shift");
    expectLeewayError(() => cusumArl(0.5, 4, 0, { sides: 3 as 1 }), "E_OPTION", "sides");
    expectLeewayError(() => ewmaArl(0, 3, 0), "E_OPTION", "lambda");
    expectLeewayError(() => ewmaArl(0.1, -3, 0), "E_OPTION", "L");
    expectLeewayError(() => ewmaArl(0.1, 3, Infinity), "E_OPTION", "shift");
    expectLeewayError(() => ewmaArl(0.1, 3, 0, { states: 2 }), "E_OPTION", "states");
  });
});
