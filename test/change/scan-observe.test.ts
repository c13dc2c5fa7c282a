import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { Adwin, Cusum, EwmaChart, PageHinkley, type ChangeTest } from "@leeway/change";

// Long streams, so that the scans cross their blocks (256 samples) and ADWIN its checks many times,
// with non-finite samples skipped on the way: the fast paths must reach observe's state bit for bit.

/** Level segments of 1 to 900 samples with small noise, and now and then a NaN or ±Infinity. */
const longStream = fc
  .array(
    fc.record({
      level: fc.double({ min: -3, max: 3, noNaN: true }),
      length: fc.integer({ min: 1, max: 900 }),
      noise: fc.array(fc.double({ min: -1.5, max: 1.5, noNaN: true }), { minLength: 1, maxLength: 11 }),
      hole: fc.option(fc.constantFrom(Number.NaN, Infinity, -Infinity), { nil: undefined }),
    }),
    { minLength: 1, maxLength: 8 },
  )
  .map((segments) => {
    const out: number[] = [];
    for (const s of segments) {
      for (let i = 0; i < s.length; i++) out.push(s.level + (s.noise[i % s.noise.length] as number));
      if (s.hole !== undefined) out.push(s.hole);
    }
    return Float64Array.from(out);
  });

/** Alarm indices with the snapshot right after each, and the final snapshot, by observe (restarting after each alarm). */
function byObserve(test: ChangeTest, xs: Float64Array): unknown[] {
  const out: unknown[] = [];
  for (let i = 0; i < xs.length; i++) {
    if (test.observe(xs[i] as number).status === "change") {
      out.push(i, test.snapshot());
      test.restart();
    }
  }
  out.push(test.snapshot());
  return out;
}

/** The same by scan. */
function byScan(test: ChangeTest, xs: Float64Array): unknown[] {
  const out: unknown[] = [];
  for (let from = 0; from < xs.length; ) {
    const hit = test.scan(xs, from);
    if (hit < 0) break;
    out.push(hit, test.snapshot());
    test.restart();
    from = hit + 1;
  }
  out.push(test.snapshot());
  return out;
}

const subjects: Record<string, () => ChangeTest> = {
  Cusum: () => new Cusum({ mean: 0, sigma: 1, k: 0.5, h: 12, nonFinite: "skip" }),
  EwmaChart: () => new EwmaChart({ mean: 0, sigma: 1, lambda: 0.05, L: 3.5, limits: "exact", nonFinite: "skip" }),
  PageHinkley: () => new PageHinkley({ alarmLevel: 40, tolerance: 0.05, direction: "both", nonFinite: "skip" }),
  Adwin: () => new Adwin({ delta: 0.002, nonFinite: "skip" }),
};

describe("scan equals repeated observe over long streams", () => {
  for (const [name, make] of Object.entries(subjects)) {
    it(`${name}: scan finds observe's alarms, with the same state at each and at the end`, () => {
      fc.assert(
        fc.property(longStream, (xs) => {
          expect(byScan(make(), xs)).toEqual(byObserve(make(), xs));
        }),
        { numRuns: 25 },
      );
    });
  }
});
