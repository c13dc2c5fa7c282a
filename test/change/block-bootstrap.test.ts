import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { BlockBootstrap } from "../../packages/change/src/block-bootstrap.js";

describe("BlockBootstrap", () => {
  it("lays whole blocks of consecutive reference values end to end, however the stream is cut into fills", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 9 }), fc.array(fc.integer({ min: 1, max: 40 }), { minLength: 1, maxLength: 12 }), (blockLength, fills) => {
        const reference = Float64Array.from({ length: 50 }, (_, i) => i); // value = position
        const stream = new BlockBootstrap(reference, blockLength, new RandomSource(blockLength));
        const out: number[] = [];
        for (const length of fills) {
          const chunk = new Float64Array(length);
          stream.fill(chunk);
          out.push(...chunk);
        }
        for (let start = 0; start < out.length; start += blockLength) {
          const first = out[start] as number;
          expect(first).toBeLessThanOrEqual(50 - blockLength);
          for (let k = 1; k < blockLength && start + k < out.length; k++) expect(out[start + k]).toBe(first + k);
        }
      }),
    );
  });

  it("is deterministic for a seed and independent of how the stream is cut", () => {
    const reference = Float64Array.from({ length: 30 }, (_, i) => i * i);
    const whole = new Float64Array(100);
    new BlockBootstrap(reference, 4, new RandomSource("s")).fill(whole);
    const parts = new BlockBootstrap(reference, 4, new RandomSource("s"));
    const a = new Float64Array(37);
    const b = new Float64Array(63);
    parts.fill(a);
    parts.fill(b);
    expect([...a, ...b]).toEqual([...whole]);
  });
});
