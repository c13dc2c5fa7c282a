import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { MaxAddTree } from "../../packages/change/src/max-add-tree.js";

describe("MaxAddTree", () => {
  it("after any range additions max equals the largest slot of a plain array given the same additions, and reset() restores the start", () => {
    const sizeAndOps = fc.integer({ min: 1, max: 37 }).chain((size) =>
      fc.tuple(
        fc.array(fc.integer({ min: -1000, max: 1000 }), { minLength: size, maxLength: size }),
        fc.array(fc.tuple(fc.integer({ min: 0, max: size }), fc.integer({ min: 0, max: size }), fc.integer({ min: -50, max: 50 })), { maxLength: 120 }),
      ),
    );
    fc.assert(
      fc.property(sizeAndOps, ([start, ops]) => {
        const tree = new MaxAddTree(Float64Array.from(start));
        const plain = [...start];
        for (const [a, b, d] of ops) {
          const [l, r] = a <= b ? [a, b] : [b, a];
          tree.add(l, r, d);
          for (let i = l; i < r; i++) plain[i] = (plain[i] as number) + d;
          expect(tree.max).toBe(Math.max(...plain));
        }
        tree.reset();
        expect(tree.max).toBe(Math.max(...start));
      }),
      { numRuns: 150 },
    );
  });
});
