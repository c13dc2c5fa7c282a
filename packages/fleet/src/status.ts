import { integerInRange, optionsObject } from "@leeway/core";
import { checkPrefix, fleetKeys, partitionKeys } from "./keys.js";
import type { RedisClient } from "./scripts.js";
import { entriesAdded } from "./worker.js";

/** One partition in {@link FleetStatus}. */
export interface PartitionStatus {
  partition: number;
  /** Lease holder, or null when the lease is free. */
  owner: string | null;
  /** Current fencing token (0 before the first owner). */
  token: number;
  /** Last committed input id. */
  offset: string;
  /** Input id at which the stored snapshots are whole (a new owner replays from here to `offset`). */
  checkpoint: string;
  /** Input entries not yet committed. */
  lag: number;
  deadLetters: number;
  /** Streams whose engine holds a latched alarm (or whose snapshot was refused). */
  openAlarms: number;
  quarantined: number;
}

/** What `leeway fleet status` shows. */
export interface FleetStatus {
  partitions: PartitionStatus[];
  /** Live workers (heartbeat within three lease times, by the caller's clock). */
  workers: string[];
  /** Site → stream ids with an open alarm, sorted. */
  alarmsBySite: Record<string, string[]>;
  totalLag: number;
}

/**
 * Reads the state of a fleet: per partition its owner, token, offset, lag,
 * dead letters and open alarms; the live workers; open alarms per site.
 * @example
 * const status = await fleetStatus(redis, { partitions: 16 });
 * status.totalLag; // 0 once the workers have caught up
 */
export async function fleetStatus(client: RedisClient, options: { prefix?: string; partitions: number; leaseMs?: number }): Promise<FleetStatus> {
  const o = optionsObject<{ prefix?: string; partitions: number; leaseMs?: number }>("fleetStatus", options, ["prefix", "partitions", "leaseMs"]);
  const prefix = checkPrefix("fleetStatus", o.prefix ?? "leeway");
  const partitions = integerInRange("fleetStatus", "partitions", o.partitions, 1, 1 << 16);
  const leaseMs = integerInRange("fleetStatus", "leaseMs", o.leaseMs ?? 10_000, 200, 600_000);
  const alarmsBySite: Record<string, string[]> = {};
  const rows = await Promise.all(
    Array.from({ length: partitions }, async (_, p): Promise<PartitionStatus> => {
      const k = partitionKeys(prefix, p);
      const [meta, lease, added, dead, alarms, quarantined] = await Promise.all([
        client.hmget(k.meta, "offset", "consumed", "fence", "checkpoint"),
        client.get(k.lease),
        entriesAdded(client, k.input),
        client.xlen(k.dead),
        client.hgetall(k.alarms),
        client.hlen(k.quarantine),
      ]);
      for (const [stream, site] of Object.entries(alarms)) (alarmsBySite[site] ??= []).push(stream);
      return {
        partition: p,
        owner: lease === null ? null : lease.replace(/:\d+$/, ""),
        token: Number(meta[2] ?? 0),
        offset: meta[0] ?? "0-0",
        checkpoint: meta[3] ?? meta[0] ?? "0-0",
        lag: Math.max(0, added - Number(meta[1] ?? 0)),
        deadLetters: dead,
        openAlarms: Object.keys(alarms).length,
        quarantined,
      };
    }),
  );
  for (const list of Object.values(alarmsBySite)) list.sort();
  const workers = await client.zrangebyscore(fleetKeys(prefix).workers, Date.now() - 3 * leaseMs, "+inf");
  return { partitions: rows, workers, alarmsBySite, totalLag: rows.reduce((s, r) => s + r.lag, 0) };
}
