import type { Snapshot } from "./snapshot.js";

/** A component whose whole state can be written out as plain data. */
export interface Snapshotable<S = unknown> {
  snapshot(): Snapshot<S>;
}

/** Counts of what a component has seen; every reading of a sequential component carries them. */
export interface SampleCounts {
  /** Finite samples taken into the state. */
  count: number;
  /** Non-finite samples skipped under `nonFinite: "skip"`. */
  skipped: number;
}
