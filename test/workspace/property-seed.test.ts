import fc from "fast-check";
import { describe, expect, inject, it } from "vitest";
import { FIXED_PROPERTY_SEED, readPropertySettings } from "../support/property-seed.js";

describe("property seed (fast-check runs reproducibly)", () => {
  it("every property of the run starts from the run's seed", () => {
    const settings = inject("propertySettings");
    expect(fc.readConfigureGlobal().seed).toBe(settings.seed);
    const details = fc.check(fc.property(fc.integer(), () => true), { numRuns: 7 });
    expect(details.seed).toBe(settings.seed);
    expect(details.numRuns).toBe(7 * settings.runsFactor);
  });

  it("the same seed draws the same cases", () => {
    const draw = (): number[] => {
      const seen: number[] = [];
      fc.check(fc.property(fc.integer(), (x) => { seen.push(x); }), { numRuns: 20 });
      return seen;
    };
    expect(draw()).toEqual(draw());
  });

  it("npm test uses the fixed seed; a logged seed replays; fresh draws one; bad values are refused", () => {
    expect(readPropertySettings({})).toEqual({ seed: FIXED_PROPERTY_SEED, runsFactor: 1, origin: "fixed" });
    expect(readPropertySettings({ LEEWAY_PROPERTY_SEED: "-42", LEEWAY_PROPERTY_RUNS: "10" })).toEqual({ seed: -42, runsFactor: 10, origin: "given" });
    const fresh = readPropertySettings({ LEEWAY_PROPERTY_SEED: "fresh" });
    expect(fresh.origin).toBe("fresh");
    expect(Number.isInteger(fresh.seed)).toBe(true);
    expect(() => readPropertySettings({ LEEWAY_PROPERTY_SEED: "1.5" })).toThrow(/LEEWAY_PROPERTY_SEED/);
    expect(() => readPropertySettings({ LEEWAY_PROPERTY_RUNS: "0" })).toThrow(/LEEWAY_PROPERTY_RUNS/);
  });
});
