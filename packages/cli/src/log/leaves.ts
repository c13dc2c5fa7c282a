/**
 * The leaves of a decision's evidence: every number, string, boolean or null
 * reached through objects and arrays of numbers, in a fixed walk order. A
 * compact log row holds one cell per leaf.
 */

/** One step of a leaf's path: an object key, or an index into an array of numbers. */
export type Step = string | number;

/** Where the leaves of an evidence object are, and their values. */
export interface Leaves {
  /** One path per leaf; a path's numeric steps index arrays. */
  paths: Step[][];
  /** The paths joined, as one key for comparing shapes. */
  shape: string;
  values: unknown[];
}

function numericArray(v: unknown[]): boolean {
  for (const x of v) if (typeof x !== "number" && x !== null) return false;
  return v.length > 0;
}

/**
 * Walks an evidence object: nested objects and non-empty arrays of numbers
 * are opened; any other value (a number, string, boolean, null, an empty
 * array or object, an array of other things) is a leaf.
 * @example
 * leavesOf({ liveScore: 0.2, referenceScores: [0.3], change: { status: "stable" } }).paths;
 * // [["liveScore"], ["referenceScores", 0], ["change", "status"]]
 */
export function leavesOf(evidence: Record<string, unknown>): Leaves {
  const paths: Step[][] = [];
  const values: unknown[] = [];
  const keys: string[] = [];
  const walk = (value: unknown, path: Step[], key: string): void => {
    if (Array.isArray(value) && numericArray(value)) {
      for (let i = 0; i < value.length; i++) walk(value[i], [...path, i], `${key}[${i}]`);
      return;
    }
    if (typeof value === "object" && value !== null && !Array.isArray(value) && Object.keys(value).length > 0) {
      for (const [k, v] of Object.entries(value)) walk(v, [...path, k], `${key}.${JSON.stringify(k)}`);
      return;
    }
    paths.push(path);
    values.push(value);
    keys.push(key);
  };
  for (const [k, v] of Object.entries(evidence)) walk(v, [k], JSON.stringify(k));
  return { paths, shape: keys.join(" "), values };
}

/** Builds the evidence object back from its leaf paths and values (the inverse of {@link leavesOf}). */
export function evidenceFrom(paths: readonly Step[][], values: readonly unknown[]): Record<string, unknown> {
  const root: Record<string, unknown> = {};
  for (let j = 0; j < paths.length; j++) {
    const path = paths[j] as Step[];
    let node: Record<string | number, unknown> = root;
    for (let s = 0; s < path.length - 1; s++) {
      const step = path[s] as Step;
      let next = node[step] as Record<string | number, unknown> | undefined;
      if (next === undefined) {
        next = (typeof path[s + 1] === "number" ? [] : {}) as Record<string | number, unknown>;
        node[step] = next;
      }
      node = next;
    }
    node[path[path.length - 1] as Step] = values[j];
  }
  return root;
}
