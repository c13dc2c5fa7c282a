import type { PartitionKeys } from "./keys.js";
import { ACQUIRE, RELEASE, RENEW, type RedisClient } from "./scripts.js";

/** A lease held on a partition: the fencing token and the committed position at the time it was taken. */
export interface HeldLease {
  token: string;
  /** Last committed input id. */
  offset: string;
  /** Input entries committed. */
  consumed: number;
  /** Input id at which the stored snapshots were last made whole (at or before `offset`). */
  checkpoint: string;
}

/**
 * Takes partition's lease for `owner` for `leaseMs` milliseconds (or renews it
 * when `owner` holds it already). A new owner gets a new fencing token, one
 * above every earlier one. Returns null when another owner holds the lease.
 * @example
 * const lease = await acquireLease(redis, partitionKeys("leeway", 0), "worker-a", 10_000);
 * lease?.token; // "1" on a fresh database
 */
export async function acquireLease(client: RedisClient, keys: Pick<PartitionKeys, "meta" | "lease">, owner: string, leaseMs: number): Promise<HeldLease | null> {
  const reply = (await ACQUIRE.run(client, [keys.meta, keys.lease], [owner, leaseMs])) as [string, string, string, string] | null;
  if (reply === null) return null;
  return { token: String(reply[0]), offset: String(reply[1]), consumed: Number(reply[2]), checkpoint: String(reply[3]) };
}

/** Extends a held lease; false when `token` is no longer the partition's current one (the lease is lost). */
export async function renewLease(client: RedisClient, keys: PartitionKeys, owner: string, token: string, leaseMs: number): Promise<boolean> {
  return (await RENEW.run(client, [keys.meta, keys.lease], [owner, token, leaseMs])) === 1;
}

/** Gives a held lease up at once (a graceful stop or a rebalance), so the next owner need not wait for it to expire. */
export async function releaseLease(client: RedisClient, keys: PartitionKeys, owner: string, token: string): Promise<boolean> {
  return (await RELEASE.run(client, [keys.lease], [owner, token])) === 1;
}
