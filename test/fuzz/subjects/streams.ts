import fc from "fast-check";
import type { FuzzSubject } from "../probe.js";
import type { Snapshot } from "@leeway/core";

/** A stream of ordinary finite samples: scores around a level, with the occasional jump. */
export const scalarStream = (minLength = 8, maxLength = 60): fc.Arbitrary<number[]> =>
  fc.array(fc.oneof({ weight: 4, arbitrary: fc.double({ min: 0, max: 10, noNaN: true }) }, { weight: 1, arbitrary: fc.double({ min: -1e3, max: 1e3, noNaN: true }) }), { minLength, maxLength });

/** A stream of vectors of length n with entries of order one. */
export const vectorStream = (n: number, minLength = 8, maxLength = 40): fc.Arbitrary<number[][]> =>
  fc.array(fc.array(fc.double({ min: -3, max: 3, noNaN: true }), { minLength: n, maxLength: n }), { minLength, maxLength });

/** The `nonFinite` option, left out or given either way. */
export const nonFinite = fc.constantFrom<"refuse" | "skip" | undefined>(undefined, "refuse", "skip");

/** Drops keys whose value is undefined (a left-out option). */
export function given<T extends object>(o: T): T {
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined)) as T;
}

interface ScalarComponent {
  observe(x: number): unknown;
  snapshot(): Snapshot;
}

/** A subject for a component that observes one number at a time. */
export function scalarSubject<C extends ScalarComponent>(
  name: string,
  options: fc.Arbitrary<object>,
  create: (options: never) => C,
  restore: (snapshot: unknown) => C,
  stream: fc.Arbitrary<number[]> = scalarStream(),
): FuzzSubject<C, number> {
  return {
    name,
    setup: fc.record({ options, inputs: stream }),
    create: (o) => create(o as never),
    feed: (c, x) => c.observe(x),
    snapshot: (c) => c.snapshot(),
    restore,
    place: (_x, value) => value,
  };
}

/** A vector input with `value` at element `at` (the whole input when `at` < 0 or beyond its end). */
export function placeInVector(x: readonly number[], value: unknown, at: number): unknown {
  if (at < 0 || at >= x.length) return value;
  const copy: unknown[] = [...x];
  copy[at] = value;
  return copy;
}
