import fc from "fast-check";
import { expect } from "vitest";
import { SnapshotError, type Snapshot } from "@leeway/core";

/** A path into a JSON tree: object keys and array indices. */
export type JsonPath = (string | number)[];

export interface CorruptionOptions {
  /**
   * Paths (inside `state`) of size fields — dimensions, capacities, window
   * lengths — that must refuse an absurd value (10^9) before allocating.
   */
  sizePaths?: JsonPath[];
  /** Arrays (paths inside `state`) whose length may legitimately vary; no length mutation is tried on them. */
  variableLengthPaths?: JsonPath[];
  /** Runs of the random mutation property (default 150). */
  numRuns?: number;
}

interface Mutation {
  description: string;
  snapshot: unknown;
}

/**
 * Asserts that `restore` refuses, with a SnapshotError (code E_SNAPSHOT), each
 * corruption of a valid snapshot: a wrong kind, a newer version, every
 * size field set absurdly large, and (by fast-check) a missing field, an array
 * one element too long or too short, and a number replaced by NaN, ±Infinity
 * or an object anywhere in the state (not a string: some number fields, such as seeds, also take strings).
 */
export function expectRefusesCorruptions(restore: (snapshot: unknown) => unknown, valid: Snapshot, options: CorruptionOptions = {}): void {
  const clean = JSON.parse(JSON.stringify(valid)) as Snapshot;
  expect(() => restore(structuredClone(clean))).not.toThrow();
  const fixed: Mutation[] = [
    { description: "wrong kind", snapshot: { ...structuredClone(clean), kind: `${clean.kind}.other` } },
    { description: "newer version", snapshot: { ...structuredClone(clean), version: clean.version + 1 } },
    { description: "no state", snapshot: { kind: clean.kind, version: clean.version } },
    { description: "not an object", snapshot: "snapshot" },
  ];
  for (const path of options.sizePaths ?? []) {
    const copy = structuredClone(clean);
    setAt(copy.state, path, 1e9);
    fixed.push({ description: `absurd size at ${path.join(".")}`, snapshot: copy });
  }
  for (const m of fixed) expectRefused(restore, m);

  const leaves = collectPaths(clean.state, []);
  const variable = (options.variableLengthPaths ?? []).map((p) => p.join("."));
  const arrays = leaves.filter((p) => Array.isArray(getAt(clean.state, p)) && !variable.includes(p.join(".")));
  const keyed = leaves.filter((p) => typeof p[p.length - 1] === "string");
  const numeric = leaves.filter((p) => typeof getAt(clean.state, p) === "number");
  const strings = leaves.filter((p) => typeof getAt(clean.state, p) === "string");

  const mutations: fc.Arbitrary<Mutation>[] = [];
  if (keyed.length > 0) {
    mutations.push(
      fc.constantFrom(...keyed).map((path) => {
        const copy = structuredClone(clean);
        deleteAt(copy.state, path);
        return { description: `missing ${path.join(".")}`, snapshot: copy };
      }),
    );
  }
  if (arrays.length > 0) {
    mutations.push(
      fc.tuple(fc.constantFrom(...arrays), fc.boolean()).map(([path, grow]) => {
        const copy = structuredClone(clean);
        const array = getAt(copy.state, path) as unknown[];
        if (grow || array.length === 0) array.push(array.length > 0 ? structuredClone(array[array.length - 1]) : 0);
        else array.pop();
        return { description: `${grow ? "longer" : "shorter"} array at ${path.join(".")}`, snapshot: copy };
      }),
    );
  }
  if (numeric.length > 0) {
    mutations.push(
      fc.tuple(fc.constantFrom(...numeric), fc.constantFrom<unknown>(Number.NaN, Infinity, -Infinity, {})).map(([path, bad]) => {
        const copy = structuredClone(clean);
        setAt(copy.state, path, bad);
        return { description: `${String(bad)} at ${path.join(".")}`, snapshot: copy };
      }),
    );
  }
  if (strings.length > 0) {
    mutations.push(
      fc.constantFrom(...strings).map((path) => {
        const copy = structuredClone(clean);
        setAt(copy.state, path, {}); // not a number: some string fields, such as seeds, also take numbers
        return { description: `object instead of string at ${path.join(".")}`, snapshot: copy };
      }),
    );
  }
  if (mutations.length === 0) return;
  fc.assert(
    fc.property(fc.oneof(...mutations), (m) => {
      expectRefused(restore, m);
    }),
    { numRuns: options.numRuns ?? 150 },
  );
}

function expectRefused(restore: (snapshot: unknown) => unknown, m: Mutation): void {
  let thrown: unknown = undefined;
  try {
    restore(m.snapshot);
  } catch (error) {
    thrown = error;
  }
  if (!(thrown instanceof SnapshotError)) {
    throw new Error(`restore did not refuse the snapshot with a SnapshotError (${m.description}); it ${thrown === undefined ? "accepted it" : `threw ${String(thrown)}`}`);
  }
  expect(thrown.code).toBe("E_SNAPSHOT");
}

function collectPaths(node: unknown, prefix: JsonPath): JsonPath[] {
  const out: JsonPath[] = [];
  if (Array.isArray(node)) {
    node.forEach((child, i) => {
      out.push([...prefix, i]);
      out.push(...collectPaths(child, [...prefix, i]));
    });
  } else if (typeof node === "object" && node !== null) {
    for (const [key, child] of Object.entries(node)) {
      out.push([...prefix, key]);
      out.push(...collectPaths(child, [...prefix, key]));
    }
  }
  return out;
}

function getAt(root: unknown, path: JsonPath): unknown {
  let node = root;
  for (const key of path) node = (node as Record<string | number, unknown>)[key];
  return node;
}

function setAt(root: unknown, path: JsonPath, value: unknown): void {
  const parent = getAt(root, path.slice(0, -1)) as Record<string | number, unknown>;
  parent[path[path.length - 1] as string | number] = value;
}

function deleteAt(root: unknown, path: JsonPath): void {
  const parent = getAt(root, path.slice(0, -1)) as Record<string, unknown>;
  delete parent[path[path.length - 1] as string];
}
