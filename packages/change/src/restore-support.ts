import { LeewayError, SnapshotError } from "@leeway/core";

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
