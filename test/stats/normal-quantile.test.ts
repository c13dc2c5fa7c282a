import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { normalQuantile, normalSurvival } from "@leeway/stats";
import { expectLeewayError } from "../support/errors.js";


describe("normalQuantile", () => {
  it("the @example and the usual two-sided points 1.644854, 1.959964, 2.575829, 3.290527 (Abramowitz & Stegun 1964, Table 26.5, from memory)", () => {
    expect(normalQuantile(0.975).toFixed(6)).toBe("1.959964");
    expect(normalQuantile(0.95).toFixed(6)).toBe("1.644854");
    expect(normalQuantile(0.995).toFixed(6)).toBe("2.575829");
    expect(normalQuantile(0.9995).toFixed(6)).toBe("3.290527");
    expect(normalQuantile(0.5)).toBe(0);
  });

  it("inverts the normal tail to 1e-12 relative across (1e-300, 0.5] and is odd about 0.5", () => {
    fc.assert(
      fc.property(fc.double({ min: -300, max: Math.log10(0.5), noNaN: true }), (e) => {
        const q = 10 ** e;
        const z = normalQuantile(q);
        expect(Math.abs(normalSurvival(-z) - q) / q).toBeLessThan(1e-12);
        if (q > 1e-6) expect(normalQuantile(1 - q)).toBeCloseTo(-z, 9); // 1 − q itself is rounded: no tighter check
      }),
      { numRuns: 300 },
    );
  });

  it("refuses p outside (0, 1) naming p", () => {
    for (const p of [0, 1, -0.1, Number.NaN]) expectLeewayError(() => normalQuantile(p), "E_OPTION", "p");
  });
});
