import FFT from "fft.js";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { RealFft } from "@leeway/signal";

describe("RealFft against an outside FFT", () => {
  it("matches fft.js 4.0.4 (general-purpose radix-4 FFT from the npm registry, realTransform + completeSpectrum) to 1e-10 relative, N = 4..4096", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 2, max: 12 }).chain((log) => fc.array(fc.double({ min: -1e4, max: 1e4, noNaN: true }), { minLength: 2 ** log, maxLength: 2 ** log })),
        (xs) => {
          const n = xs.length;
          const reference = new FFT(n);
          const out = reference.createComplexArray() as number[];
          reference.realTransform(out, xs);
          reference.completeSpectrum(out);
          const ours = new RealFft(n).forward(Float64Array.from(xs));
          let scale = 1e-300;
          for (let k = 0; k <= n / 2; k++) scale = Math.max(scale, Math.hypot(out[2 * k] as number, out[2 * k + 1] as number));
          const at = (k: number): [number, number] => (k === 0 ? [ours[0] as number, 0] : k === n / 2 ? [ours[1] as number, 0] : [ours[2 * k] as number, ours[2 * k + 1] as number]);
          for (let k = 0; k <= n / 2; k++) {
            const [re, im] = at(k);
            expect(Math.hypot(re - (out[2 * k] as number), im - (out[2 * k + 1] as number)) / scale).toBeLessThan(1e-10);
          }
        },
      ),
      { numRuns: 40 },
    );
  });
});
