import type { PartitionKeys } from "./keys.js";
import type { BatchPlan } from "./partition.js";
import { COMMIT, type RedisClient } from "./scripts.js";

/** A commit refused because a newer owner holds the partition (the fencing token is stale) or the offset moved. */
export class FencedError extends Error {
  readonly partition: number;
  constructor(partition: number, message: string) {
    super(`partition ${partition}: ${message}`);
    this.name = "FencedError";
    this.partition = partition;
  }
}

function section(args: (string | Buffer | number)[], entries: readonly string[][]): void {
  args.push(entries.length);
  for (const e of entries) args.push(e.length / 2, ...e);
}

/**
 * Commits one batch in one atomic script on the partition's shard: the
 * decisions and operator receipts (output stream), the dead letters, the
 * open-alarm and quarantine changes and the new input offset, and — when the
 * plan is a checkpoint — the snapshots of every engine changed since the last
 * checkpoint with the checkpoint moved to the new offset; the lease is
 * renewed with it. Throws {@link FencedError} when `token` is no
 * longer the partition's current fencing token or the stored offset is not
 * `plan.fromOffset` — then nothing was written.
 */
export async function commitBatch(client: RedisClient, keys: PartitionKeys, partition: number, owner: string, token: string, plan: BatchPlan, leaseMs: number): Promise<void> {
  const args: (string | Buffer | number)[] = [owner, token, plan.fromOffset, plan.toOffset, plan.consumed, leaseMs, plan.checkpoint ? "1" : "0", plan.snapshots.length];
  for (const [stream, bytes] of plan.snapshots) args.push(stream, bytes);
  section(args, plan.outputs);
  section(args, plan.dead);
  args.push(plan.alarms.length);
  for (const [stream, site] of plan.alarms) args.push(stream, site);
  args.push(plan.quarantine.length);
  for (const [stream, reason] of plan.quarantine) args.push(stream, reason);
  try {
    await COMMIT.run(client, [keys.meta, keys.lease, keys.snapshots, keys.output, keys.dead, keys.alarms, keys.quarantine], args);
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    if (message.startsWith("FENCED") || message.startsWith("OFFSET")) throw new FencedError(partition, message);
    throw error;
  }
}
