import fc from "fast-check";
import { RandomSource } from "@leeway/core";
import { Framer } from "@leeway/signal";
import { MachineSimulator, type ScenarioSpec } from "@leeway/sim";
import type { FuzzSubject } from "../probe.js";
import { given, nonFinite, scalarStream } from "./streams.js";

/** The framer: samples in, a copy of each completed frame out. */
export const framerSubject: FuzzSubject<Framer, number> = {
  name: "Framer",
  setup: fc.record({
    options: fc.oneof(
      fc.record({ size: fc.integer({ min: 1, max: 8 }), hop: fc.constantFrom(undefined, 1, 2, 3, 5, 11), nonFinite }),
      fc.record({ size: fc.integer({ min: 1, max: 8 }), overlap: fc.constantFrom(0, 0.25, 0.5, 0.75), nonFinite }),
    ).map(given),
    inputs: scalarStream(8, 60),
  }),
  create: (o) => new Framer(o as never),
  feed: (c, x) => {
    const frame = c.observe(x);
    return frame === null ? null : Array.from(frame);
  },
  snapshot: (c) => c.snapshot(),
  restore: Framer.restore,
  place: (_x, value) => value,
};

/** A short simulator scenario with every kind of event somewhere in it. */
export const scenarioSpec: fc.Arbitrary<ScenarioSpec> = fc.record({
  length: fc.constant(24),
  seed: fc.integer({ min: 0, max: 1000 }),
  frameSize: fc.constantFrom(64, 128),
  bins: fc.constantFrom(4, 16),
  schedule: fc.constantFrom(
    [{ start: 0, mode: "mid", rpm: 1485 }],
    [
      { start: 0, mode: "low", rpm: 990 },
      { start: 10, mode: "high", rpm: 2970 },
    ],
  ),
  events: fc.constantFrom(
    [],
    [{ type: "environment-shift" as const, start: 5, noiseFactor: 2, tones: [{ frequency: 120, amplitude: 0.3 }] }],
    [{ type: "degradation" as const, start: 3, end: 24, growth: "exponential" as const, rate: 6 }],
    [
      { type: "fault" as const, start: 8, duration: 6, fault: "impacts" as const, gain: 3 },
      { type: "fault" as const, start: 12, duration: 4, fault: "clog" as const },
    ],
  ),
});

/** The machine simulator: every next() is one input (it takes no samples). */
export const simulatorSubject: FuzzSubject<MachineSimulator, null> = {
  name: "MachineSimulator",
  setup: fc.record({ options: scenarioSpec, inputs: fc.array(fc.constant(null), { minLength: 4, maxLength: 24 }) }),
  create: (o) => new MachineSimulator(o as ScenarioSpec),
  feed: (c) => {
    const s = c.next();
    return s === null ? null : { index: s.index, spectrum: Array.from(s.spectrum), truth: s.truth };
  },
  snapshot: (c) => c.snapshot(),
  restore: MachineSimulator.restore,
  place: () => null,
};

/** The seeded random source (core): draws of every kind by turns. */
export const randomSubject: FuzzSubject<RandomSource, 0 | 1 | 2 | 3> = {
  name: "RandomSource",
  setup: fc.record({ options: fc.oneof(fc.integer(), fc.string({ minLength: 1, maxLength: 8 })), inputs: fc.array(fc.constantFrom<0 | 1 | 2 | 3>(0, 1, 2, 3), { minLength: 4, maxLength: 40 }) }),
  create: (seed) => new RandomSource(seed as number | string),
  feed: (c, k) => (k === 0 ? c.next() : k === 1 ? c.normal() : k === 2 ? c.exponential(2) : c.integer(7)),
  snapshot: (c) => c.snapshot(),
  restore: RandomSource.restore,
  place: () => null,
};

