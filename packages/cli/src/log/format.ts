/** The first line of a compact decision log names its format; readers check it. */
export const COMPACT_FORMAT = "leeway-decisions-compact";
/** Version of the compact format (a reader refuses a newer one). */
export const COMPACT_VERSION = 1;
/** Samples between two full decision lines when nothing else calls for one. */
export const COMPACT_CHECKPOINT = 4096;
