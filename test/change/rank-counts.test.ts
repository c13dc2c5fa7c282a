import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { RankCounts } from "../../packages/change/src/rank-counts.js";

describe("RankCounts", () => {
  it("below(v) equals a count of the added values < v, and from(counts()) rebuilds the same tree", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 40 }).chain((size) => fc.tuple(fc.constant(size), fc.array(fc.integer({ min: 0, max: size - 1 }), { maxLength: 200 }))), ([size, values]) => {
        const r = new RankCounts(size);
        for (const v of values) r.add(v);
        const copy = RankCounts.from(r.counts());
        for (let v = 0; v <= size; v++) {
          const brute = values.filter((x) => x < v).length;
          expect(r.below(v)).toBe(brute);
          expect(copy.below(v)).toBe(brute);
        }
        expect(copy.total).toBe(values.length);
        r.clear();
        expect([r.total, r.below(size)]).toEqual([0, 0]);
      }),
      { numRuns: 100 },
    );
  });
});
