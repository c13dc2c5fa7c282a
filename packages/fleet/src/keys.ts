import { integerInRange, OptionError } from "@leeway/core";

/**
 * The Redis keys of one partition. All of them carry the hash tag
 * `{<prefix>:p<n>}`, so on Redis Cluster they live in one slot and one
 * script can touch them all atomically.
 */
export interface PartitionKeys {
  /** Input stream: sample records and operator events, in order. */
  input: string;
  /** Output stream: one entry per input record that produced a decision, a fleet alarm or an operator receipt. */
  output: string;
  /** Dead-letter stream: records the partition could not use, with the reason. */
  dead: string;
  /** Hash: stream id → compressed engine snapshot. */
  snapshots: string;
  /** Hash: stream id → reason, for streams whose snapshot was refused. */
  quarantine: string;
  /** Hash: stream id → site, for streams whose engine holds a latched alarm. */
  alarms: string;
  /** Hash: `offset` (last committed input id), `consumed` (records committed), `fence` (newest lease token). */
  meta: string;
  /** String `<owner>:<token>` with a time to live: the partition's lease. */
  lease: string;
}

/** Checks a key prefix: 1 to 64 characters of letters, digits, `.`, `_`, `-` and `:`. */
export function checkPrefix(component: string, prefix: unknown): string {
  if (typeof prefix !== "string" || !/^[A-Za-z0-9._:-]{1,64}$/.test(prefix)) {
    throw new OptionError(component, "prefix", prefix, "1 to 64 characters of letters, digits, '.', '_', '-' and ':'");
  }
  return prefix;
}

/**
 * The keys of partition `partition` under `prefix`.
 * @example
 * partitionKeys("leeway", 3).input; // "leeway:{leeway:p3}:in"
 */
export function partitionKeys(prefix: string, partition: number): PartitionKeys {
  const tag = `${prefix}:{${prefix}:p${partition}}`;
  return {
    input: `${tag}:in`,
    output: `${tag}:out`,
    dead: `${tag}:dead`,
    snapshots: `${tag}:snap`,
    quarantine: `${tag}:quarantine`,
    alarms: `${tag}:alarms`,
    meta: `${tag}:meta`,
    lease: `${tag}:lease`,
  };
}

/** Keys outside the partitions: the worker registry and the site-evidence consumer's lease and cursors. */
export function fleetKeys(prefix: string): { workers: string; siteMeta: string; siteLease: string; siteCursors: string } {
  const tag = `${prefix}:{${prefix}:site}`;
  return { workers: `${prefix}:workers`, siteMeta: `${tag}:meta`, siteLease: `${tag}:lease`, siteCursors: `${tag}:cursors` };
}

/**
 * The partition a stream id belongs to: FNV-1a (Fowler, Noll, Vo) 32-bit hash
 * of its UTF-8 bytes, modulo the partition count. Fixed forever for a given
 * count: changing the count moves streams (see docs/fleet.md, sizing).
 * @example
 * partitionOf("ps2-de-x", 16); // 7
 */
export function partitionOf(streamId: string, partitions: number): number {
  const n = integerInRange("partitionOf", "partitions", partitions, 1, 1 << 16);
  return fnv1a(streamId) % n;
}

/** FNV-1a 32-bit hash of a string's UTF-8 bytes (offset basis 2166136261, prime 16777619). */
export function fnv1a(text: string): number {
  const bytes = Buffer.from(text, "utf8");
  let h = 0x811c9dc5;
  for (let i = 0; i < bytes.length; i++) h = Math.imul(h ^ (bytes[i] as number), 0x01000193) >>> 0;
  return h;
}
