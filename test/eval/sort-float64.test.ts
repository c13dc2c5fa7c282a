import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { sortFloat64 } from "@leeway/eval";

const bits = (xs: Float64Array): string[] => Array.from(xs, (x) => (Object.is(x, -0) ? "-0" : String(x)));

describe("sortFloat64", () => {
  it("gives the order of Float64Array.prototype.sort, bit for bit, on every length and sign (radix path from 512 up)", () => {
    fc.assert(
      fc.property(
        fc.array(fc.oneof(fc.double({ noNaN: true }), fc.constantFrom(0, -0, 1, -1, Infinity, -Infinity, Number.MIN_VALUE, -Number.MAX_VALUE)), { minLength: 0, maxLength: 2000 }),
        (values) => {
          const expected = Float64Array.from(values).sort();
          expect(bits(sortFloat64(Float64Array.from(values)))).toEqual(bits(expected));
        },
      ),
      { numRuns: 80 },
    );
  });

  it("sorts a view into a larger buffer without touching the rest", () => {
    const buffer = new Float64Array(3000).map((_, i) => Math.sin(i) * 1e3);
    const before = buffer.slice();
    const view = buffer.subarray(1000, 2000);
    const expected = view.slice().sort();
    sortFloat64(view);
    expect(Array.from(view)).toEqual(Array.from(expected));
    expect(Array.from(buffer.subarray(0, 1000))).toEqual(Array.from(before.subarray(0, 1000)));
    expect(Array.from(buffer.subarray(2000))).toEqual(Array.from(before.subarray(2000)));
  });

  it("handles arrays of one repeated value (every pass skipped)", () => {
    const xs = new Float64Array(1000).fill(-2.5);
    expect(sortFloat64(xs).every((x) => x === -2.5)).toBe(true);
  });
});
