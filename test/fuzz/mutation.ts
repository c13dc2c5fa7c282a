import fc from "fast-check";
import type { Snapshot } from "@leeway/core";

type Path = (string | number)[];

/** Which node of a snapshot to damage and how, as plain numbers resolved against the snapshot at hand. */
export interface MutationChoice {
  node: number;
  how: number;
}

/** Draws mutation choices. */
export const mutationChoice: fc.Arbitrary<MutationChoice> = fc.record({ node: fc.nat(), how: fc.nat() });

const NUMBER_SWAPS: readonly ((x: number) => unknown)[] = [
  () => Number.NaN,
  () => Infinity,
  () => -Infinity,
  (x) => -x,
  (x) => x + 1,
  (x) => x - 1,
  (x) => x * 2,
  (x) => x / 2,
  (x) => x + 0.5,
  () => 0,
  () => -1,
  () => 1e9,
  () => 1e300,
  () => -1e300,
  () => 2 ** 53,
  (x) => String(x),
  () => null,
  () => ({}),
];

/**
 * Damages one node of the snapshot in place and says what it did: a number
 * swapped for NaN, ±Infinity, its negation, ±1, a doubling, a half-step, 0,
 * -1, 10^9, ±10^300, 2^53, a string, null or an object; an array shortened,
 * lengthened, emptied or reversed; a string or boolean changed; a field deleted;
 * the kind or version changed.
 */
export function applyMutation(snapshot: Snapshot, choice: MutationChoice): string {
  const paths = collect(snapshot.state, []);
  const envelopeChoices = 2;
  const index = choice.node % (paths.length + envelopeChoices);
  if (index === paths.length) {
    (snapshot as { kind: unknown }).kind = `${snapshot.kind}.x`;
    return "kind changed";
  }
  if (index === paths.length + 1) {
    (snapshot as { version: unknown }).version = snapshot.version + 1 + (choice.how % 2) * 0.5;
    return "version changed";
  }
  const path = paths[index] as Path;
  const where = `state.${path.join(".")}`;
  const parent = path.length === 1 ? (snapshot.state as Record<string | number, unknown>) : (getAt(snapshot.state, path.slice(0, -1)) as Record<string | number, unknown>);
  const key = path[path.length - 1] as string | number;
  const node = parent[key];
  if (!Array.isArray(parent) && choice.how % 7 === 6) {
    delete parent[key];
    return `${where} deleted`;
  }
  if (typeof node === "number") {
    const swap = NUMBER_SWAPS[choice.how % NUMBER_SWAPS.length] as (x: number) => unknown;
    parent[key] = swap(node);
    return `${where}: ${node} → ${show(parent[key])}`;
  }
  if (Array.isArray(node)) {
    const k = choice.how % 4;
    if (k === 0) node.pop();
    else if (k === 1) node.push(node.length > 0 ? structuredClone(node[node.length - 1]) : 0);
    else if (k === 2) node.length = 0;
    else node.reverse();
    return `${where}: array ${["shortened", "lengthened", "emptied", "reversed"][k]}`;
  }
  if (typeof node === "string") {
    parent[key] = choice.how % 2 === 0 ? `${node}x` : "";
    return `${where}: string changed`;
  }
  if (typeof node === "boolean") {
    parent[key] = choice.how % 2 === 0 ? !node : 1;
    return `${where}: boolean changed`;
  }
  if (node === null) {
    parent[key] = choice.how % 2 === 0 ? 0 : {};
    return `${where}: null replaced`;
  }
  parent[key] = choice.how % 2 === 0 ? null : [];
  return `${where}: object replaced`;
}

function collect(node: unknown, prefix: Path): Path[] {
  const out: Path[] = [];
  if (Array.isArray(node)) {
    // long arrays: their ends and middle only, so that the scalar fields are not drowned out
    const indices = node.length <= 3 ? node.map((_, i) => i) : [0, node.length >> 1, node.length - 1];
    for (const i of indices) {
      out.push([...prefix, i]);
      out.push(...collect(node[i], [...prefix, i]));
    }
  } else if (typeof node === "object" && node !== null) {
    for (const [k, child] of Object.entries(node)) {
      out.push([...prefix, k]);
      out.push(...collect(child, [...prefix, k]));
    }
  }
  return out;
}

function getAt(root: unknown, path: Path): unknown {
  let node = root;
  for (const p of path) node = (node as Record<string | number, unknown>)[p];
  return node;
}

function show(value: unknown): string {
  if (typeof value === "string") return JSON.stringify(value);
  if (value === null) return "null";
  if (typeof value === "object") return "an object";
  return String(value);
}
