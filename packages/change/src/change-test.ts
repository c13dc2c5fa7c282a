import type { Snapshot } from "@leeway/core";

/** What a change test says about the latest sample. */
export type ChangeStatus = "stable" | "warning" | "change";

/** Which way the statistic moved: `"up"` for an increase of the monitored level, `"down"` for a decrease. */
export type ChangeDirection = "up" | "down";

/** Which changes a one- or two-sided test watches for. */
export type ChangeSides = "up" | "down" | "both";

/**
 * The reading every change test returns from `observe`.
 * - `index`: stream position of the sample (every sample offered counts, skipped ones too), from 0.
 * - `statistic` and `threshold`: in the test's own units; `"change"` when the statistic passes the threshold,
 *   `"warning"` when it passes the warning fraction of the threshold.
 * - `direction`: which side is (or was last) active, when the test knows.
 * - `onset`: the test's own estimate of the stream index at which the change began.
 * - `skipped`: non-finite samples skipped so far under `nonFinite: "skip"`.
 */
export interface ChangeReading {
  index: number;
  status: ChangeStatus;
  statistic: number;
  threshold: number;
  direction?: ChangeDirection | undefined;
  onset?: number | undefined;
  skipped?: number;
}

/**
 * The common interface of leeway's sequential change tests.
 * - `observe(x)` takes one sample and returns a {@link ChangeReading}.
 * - `scan(xs, from)` is the fast path: it feeds `xs[from]`, `xs[from + 1]`, … with exactly the arithmetic of
 *   `observe` and stops at the first sample whose status is `"change"`, returning its index in `xs`
 *   (or −1 when none is). The state is then as if `observe` had been called up to and including that sample.
 * - `restart()` forgets the statistic after an alarm and keeps the options and any estimated in-control
 *   parameters (each test documents what it keeps).
 */
export interface ChangeTest {
  observe(x: number): ChangeReading;
  scan(xs: Float64Array, from?: number): number;
  restart(): void;
  snapshot(): Snapshot;
  readonly threshold: number;
  readonly name: string;
}
