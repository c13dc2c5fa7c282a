import fc from "fast-check";
import { expect } from "vitest";
import type { ChangeReading, ChangeTest } from "@leeway/change";
import { throughJson } from "../support/errors.js";

/** Samples with level shifts: a stream on which a change test alarms now and then. */
export const shiftedStream = fc
  .array(fc.record({ level: fc.double({ min: -4, max: 4, noNaN: true }), length: fc.integer({ min: 1, max: 80 }), noise: fc.array(fc.double({ min: -2, max: 2, noNaN: true }), { minLength: 1, maxLength: 7 }) }), { minLength: 1, maxLength: 8 })
  .map((segments) => {
    const out: number[] = [];
    for (const s of segments) for (let i = 0; i < s.length; i++) out.push(s.level + (s.noise[i % s.noise.length] as number));
    return Float64Array.from(out);
  });

/** Feeds `xs` by observe, restarting after each change; returns the indices of the changes. */
export function changesByObserve(test: ChangeTest, xs: Float64Array): number[] {
  const out: number[] = [];
  for (let i = 0; i < xs.length; i++) {
    if (test.observe(xs[i] as number).status === "change") {
      out.push(i);
      test.restart();
    }
  }
  return out;
}

/** The same through scan. */
export function changesByScan(test: ChangeTest, xs: Float64Array): number[] {
  const out: number[] = [];
  for (let from = 0; from < xs.length; ) {
    const hit = test.scan(xs, from);
    if (hit < 0) break;
    out.push(hit);
    test.restart();
    from = hit + 1;
  }
  return out;
}

/** Property: scan finds the changes observe finds and leaves the same state, sample for sample. */
export function expectScanEqualsObserve(make: () => ChangeTest, numRuns = 120): void {
  fc.assert(
    fc.property(shiftedStream, (xs) => {
      const a = make();
      const b = make();
      expect(changesByScan(b, xs)).toEqual(changesByObserve(a, xs));
      expect(b.snapshot()).toEqual(a.snapshot());
    }),
    { numRuns },
  );
}

/** Snapshot mid-stream through JSON, restore, and both continue with identical readings and snapshots. */
export function expectRestoreContinues(make: () => ChangeTest, restore: (s: unknown) => ChangeTest, xs: Float64Array): void {
  const original = make();
  const half = xs.length >> 1;
  for (let i = 0; i < half; i++) original.observe(xs[i] as number);
  const copy = restore(throughJson(original.snapshot()));
  expect(copy.snapshot()).toEqual(original.snapshot());
  const ra: ChangeReading[] = [];
  const rb: ChangeReading[] = [];
  for (let i = half; i < xs.length; i++) {
    ra.push(original.observe(xs[i] as number));
    rb.push(copy.observe(xs[i] as number));
  }
  expect(rb).toEqual(ra);
  expect(copy.snapshot()).toEqual(original.snapshot());
}
