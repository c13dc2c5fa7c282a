import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { boundedForgetting } from "../../packages/pool/src/sherman-morrison.js";

describe("boundedForgetting", () => {
  it("keeps λ when the next trace (a − b/(λ + c))/λ is within the bound", () => {
    expect(boundedForgetting(0.9, 1, 0.1, 0.5, 100)).toBe(0.9);
  });

  it("otherwise returns the factor whose next trace equals the bound, never below λ nor above 1", () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.5, max: 0.999, noNaN: true }),
        fc.double({ min: 1, max: 100, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: 0.01, max: 10, noNaN: true }),
        (lambda, a, fraction, c) => {
          // a = tr P, c = hᵀPh, b = ‖Ph‖² ≤ a·c (Cauchy–Schwarz for P ⪰ 0)
          const b = fraction * a * c * 0.99;
          const bound = a * 0.999; // a bound the plain step would pass
          const next = (l: number): number => (a - b / (l + c)) / l;
          const applied = boundedForgetting(lambda, a, b, c, bound);
          expect(applied).toBeGreaterThanOrEqual(lambda);
          expect(applied).toBeLessThanOrEqual(1);
          if (next(lambda) <= bound) expect(applied).toBe(lambda);
          else if (applied < 1) expect(next(applied)).toBeCloseTo(bound, 6);
          else expect(next(1)).toBeGreaterThanOrEqual(bound * (1 - 1e-9));
        },
      ),
      { numRuns: 300 },
    );
  });
});
