import { describe, expect, it } from "vitest";
import { toDecibels } from "@leeway/signal";
import { expectLeewayError } from "../support/errors.js";

describe("toDecibels", () => {
  it("10·log10 for power, 20·log10 for amplitude, relative to the reference; zero maps to the floor", () => {
    const dbPower = toDecibels(Float64Array.from([1, 2, 1000, 0]));
    expect(dbPower[0]).toBe(0);
    expect(dbPower[1]).toBeCloseTo(3.0103, 4);
    expect(dbPower[2]).toBeCloseTo(30, 12);
    expect(dbPower[3]).toBe(-300);
    expect(toDecibels(Float64Array.from([2e-5]), { reference: 1e-6, kind: "amplitude" })[0]).toBeCloseTo(26.0206, 4);
    expect(toDecibels(Float64Array.from([1e-20]), { floor: -120 })[0]).toBe(-120);
    const inPlace = Float64Array.from([100]);
    expect(toDecibels(inPlace, {}, inPlace)[0]).toBe(20);
  });

  it("refuses a non-positive reference and a wrong out length", () => {
    expectLeewayError(() => toDecibels(new Float64Array(2), { reference: 0 }), "E_OPTION", "reference");
    expectLeewayError(() => toDecibels(new Float64Array(2), {}, new Float64Array(3)), "E_DIMENSION", "out");
  });
});
