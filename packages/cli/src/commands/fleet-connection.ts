import { openRedis, type RedisClient } from "@leeway/fleet";
import { numberFlag, stringFlag, type FlagSpec, type ParsedArguments } from "../args.js";
import { UsageError } from "../exit-codes.js";

/** Flags every `leeway fleet` action takes: where the fleet lives and how it is cut. */
export const FLEET_FLAGS: readonly FlagSpec[] = [
  { name: "redis", kind: "string", value: "URL", description: "Redis server (or one node of a Redis Cluster)", defaultText: "redis://127.0.0.1:6379" },
  { name: "cluster", kind: "boolean", description: "the URL names a node of a Redis Cluster" },
  { name: "prefix", kind: "string", value: "NAME", description: "key prefix of the fleet", defaultText: "leeway" },
  { name: "partitions", kind: "number", value: "N", description: "partitions of the fleet (the same number for every worker, feeder and status; never change it for a running fleet)" },
];

/** The fleet flags as values; --partitions is required. */
export function fleetFlags(parsed: ParsedArguments, command: string): { url: string; cluster: boolean; prefix: string; partitions: number } {
  const partitions = numberFlag(parsed, "partitions");
  if (partitions === undefined) throw new UsageError(`${command}: flag --partitions is required (the fleet's partition count)`);
  if (!Number.isInteger(partitions) || partitions < 1 || partitions > 65536) throw new UsageError(`${command}: flag --partitions must be an integer in [1, 65536], got ${partitions}`);
  return { url: stringFlag(parsed, "redis") ?? "redis://127.0.0.1:6379", cluster: parsed.flags.get("cluster") === true, prefix: stringFlag(parsed, "prefix") ?? "leeway", partitions };
}

/** Opens the connection; a URL that is not redis:// is a usage error. */
export function connectFleet(url: string, cluster: boolean, command: string): RedisClient {
  if (!/^redis:\/\/[^\s]+$/.test(url)) throw new UsageError(`${command}: flag --redis must be a URL like redis://127.0.0.1:6379, got ${JSON.stringify(url)}`);
  return openRedis(url, { cluster });
}

/** Closes the connection, waiting for replies in flight. */
export async function closeFleet(client: RedisClient): Promise<void> {
  await client.quit().catch(() => client.disconnect());
}
