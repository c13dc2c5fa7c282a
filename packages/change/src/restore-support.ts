import { LeewayError, SnapshotError, type NonFinitePolicy, type SnapshotReader } from "@leeway/core";
import type { ChangeSides } from "./change-test.js";

/**
 * Builds a component from options read out of a snapshot, turning any option
 * error into a {@link SnapshotError} so that `restore` refuses bad snapshots with one error class.
 */
export function buildFromSnapshot<T>(kind: string, build: () => T): T {
  try {
    return build();
  } catch (error) {
    if (error instanceof LeewayError && !(error instanceof SnapshotError)) throw new SnapshotError(kind, "state", `holds invalid options: ${error.message}`);
    throw error;
  }
}

/** Copies a value into an options object only when it is defined (for `exactOptionalPropertyTypes`). */
export function definedOnly<T extends object>(options: { [K in keyof T]: T[K] | undefined }): T {
  const out: Record<string, unknown> = {};
  for (const [key, value] of Object.entries(options)) if (value !== undefined) out[key] = value;
  return out as T;
}

/** The fields that Cusum, EwmaChart and PageHinkley snapshots share: the sides, the warning fraction, the policy and the stream position. */
export interface LevelTestFields {
  direction: ChangeSides;
  warningFraction: number;
  nonFinite: NonFinitePolicy;
  count: number;
  skipped: number;
  /** Stream index of the last sample at which the upper side was at zero, −1 before any. */
  upperZero: number;
  lowerZero: number;
}

/** Reads {@link LevelTestFields}; a last zero must lie in [−1, the last sample's index]. */
export function readLevelTestFields(r: SnapshotReader): LevelTestFields {
  const direction = r.oneOf("direction", ["up", "down", "both"] as const);
  const warningFraction = r.number("warningFraction");
  const nonFinite = r.oneOf("nonFinite", ["refuse", "skip"] as const);
  const count = r.integer("count", 0, Number.MAX_SAFE_INTEGER);
  const skipped = r.integer("skipped", 0, Number.MAX_SAFE_INTEGER);
  const last = count + skipped - 1;
  const upperZero = r.integer("upperZero", -1, last);
  const lowerZero = r.integer("lowerZero", -1, last);
  return { direction, warningFraction, nonFinite, count, skipped, upperZero, lowerZero };
}
