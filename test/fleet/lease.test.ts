import { describe, expect, test } from "vitest";
import { acquireLease, commitBatch, FencedError, partitionKeys, PartitionEngines, releaseLease, renewLease, type BatchPlan, type HeldLease } from "@leeway/fleet";
import { DecisionEngine } from "@leeway/policy";
import { sharedRedis } from "./redis-server.js";
import { SMALL_ENGINE } from "./fleet-stream.js";

const shared = sharedRedis();

const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));

function engines(partition: number, lease: HeldLease): PartitionEngines {
  return new PartitionEngines(partition, lease.token, lease, () => new DecisionEngine(SMALL_ENGINE), { inputs: null, allowNonFinite: false, checkpointEvery: 1 });
}

describe("leases with fencing tokens (Kleppmann 2016, fencing tokens; common practice)", () => {
  test("a second owner cannot take a held lease; the holder renews it; after a release the next owner gets a larger token", async () => {
    const keys = partitionKeys("lease-a", 0);
    const a = await acquireLease(shared.redis, keys, "worker-a", 5000);
    expect(a).toEqual({ token: "1", offset: "0-0", consumed: 0, checkpoint: "0-0" });
    expect(await acquireLease(shared.redis, keys, "worker-b", 5000)).toBeNull();
    expect(await acquireLease(shared.redis, keys, "worker-a", 5000)).toEqual(a); // renewal keeps the token
    expect(await renewLease(shared.redis, keys, "worker-a", "1", 5000)).toBe(true);
    expect(await releaseLease(shared.redis, keys, "worker-b", "1")).toBe(false);
    expect(await releaseLease(shared.redis, keys, "worker-a", "1")).toBe(true);
    expect((await acquireLease(shared.redis, keys, "worker-b", 5000))?.token).toBe("2");
    expect(await renewLease(shared.redis, keys, "worker-a", "1", 5000)).toBe(false);
  });

  test("a paused old owner whose lease expired cannot overwrite: its commit is refused and nothing of it is written", async () => {
    const keys = partitionKeys("lease-b", 0);
    for (let i = 0; i < 30; i++) await shared.redis.xadd(keys.input, "*", "s", `pump-${i % 3}`, "g", "harbour-lane", "v", String(1 + 0.01 * i));
    const entries = (await shared.redis.xrange(keys.input, "-", "+")) as [string, string[]][];
    const oldLease = await acquireLease(shared.redis, keys, "old", 300);
    const old = engines(0, oldLease as NonNullable<typeof oldLease>);
    const stalePlan = old.decide(entries.slice(0, 10), new Map());
    await sleep(450); // the old owner pauses (a long GC, a stopped VM) past its lease
    const newLease = await acquireLease(shared.redis, keys, "new", 5000);
    expect(newLease?.token).toBe("2");
    const fresh = engines(0, newLease as NonNullable<typeof newLease>);
    const plan = fresh.decide(entries.slice(0, 20), new Map());
    await commitBatch(shared.redis, keys, 0, "new", "2", plan, 5000);
    fresh.committed(plan);
    const before = { out: await shared.redis.xlen(keys.output), meta: await shared.redis.hgetall(keys.meta), snap: await shared.redis.hgetallBuffer(keys.snapshots) };
    const refused = await commitBatch(shared.redis, keys, 0, "old", "1", stalePlan, 300).then(() => null, (e: unknown) => e);
    expect(refused).toBeInstanceOf(FencedError);
    expect((refused as Error).message).toMatch(/token 1 .* is stale; the current token is 2/);
    expect(await shared.redis.xlen(keys.output)).toBe(before.out);
    expect(await shared.redis.hgetall(keys.meta)).toEqual(before.meta);
    expect(await shared.redis.hgetallBuffer(keys.snapshots)).toEqual(before.snap);
    expect(before.meta.offset).toBe((entries[19] as [string, string[]])[0]);
    expect(await shared.redis.get(keys.lease)).toBe("new:2");
  });

  test("a commit whose expected offset is not the stored one is refused (a replayed or reordered batch)", async () => {
    const keys = partitionKeys("lease-c", 0);
    for (let i = 0; i < 6; i++) await shared.redis.xadd(keys.input, "*", "s", "pump-0", "v", "1");
    const entries = (await shared.redis.xrange(keys.input, "-", "+")) as [string, string[]][];
    const lease = await acquireLease(shared.redis, keys, "w", 5000);
    const part = engines(0, lease as NonNullable<typeof lease>);
    const plan = part.decide(entries.slice(0, 3), new Map());
    await commitBatch(shared.redis, keys, 0, "w", "1", plan, 5000);
    const again = await commitBatch(shared.redis, keys, 0, "w", "1", plan, 5000).then(() => null, (e: unknown) => e);
    expect(again).toBeInstanceOf(FencedError);
    expect((again as Error).message).toMatch(/OFFSET expected 0-0, stored /);
    expect(await shared.redis.xlen(keys.output)).toBe(3);
  });

  test("a commit that is no checkpoint moves the offset and writes no snapshot; a checkpoint commit moves the checkpoint to the offset; a new lease reports both", async () => {
    const keys = partitionKeys("lease-d", 0);
    for (let i = 0; i < 8; i++) await shared.redis.xadd(keys.input, "*", "s", `pump-${i % 2}`, "v", "1");
    const entries = (await shared.redis.xrange(keys.input, "-", "+")) as [string, string[]][];
    const lease = (await acquireLease(shared.redis, keys, "w", 5000)) as HeldLease;
    const part = new PartitionEngines(0, lease.token, lease, () => new DecisionEngine(SMALL_ENGINE), { inputs: null, allowNonFinite: false, checkpointEvery: 2 });
    const first = part.decide(entries.slice(0, 4), new Map());
    expect([first.checkpoint, first.snapshots.length]).toEqual([false, 0]);
    await commitBatch(shared.redis, keys, 0, "w", lease.token, first, 5000);
    part.committed(first);
    await releaseLease(shared.redis, keys, "w", lease.token);
    const between = (await acquireLease(shared.redis, keys, "v", 5000)) as HeldLease;
    expect([between.offset, between.checkpoint]).toEqual([(entries[3] as [string, string[]])[0], "0-0"]);
    expect(await shared.redis.hlen(keys.snapshots)).toBe(0);
    await releaseLease(shared.redis, keys, "v", between.token);
    const again = (await acquireLease(shared.redis, keys, "w", 5000)) as HeldLease;
    const owner = new PartitionEngines(0, again.token, again, () => new DecisionEngine(SMALL_ENGINE), { inputs: null, allowNonFinite: false, checkpointEvery: 2 });
    owner.replay(entries.slice(0, 4), new Map());
    const second = owner.decide(entries.slice(4), new Map());
    expect([second.checkpoint, second.snapshots.map(([s]) => s).sort()]).toEqual([false, []]);
    await commitBatch(shared.redis, keys, 0, "w", again.token, second, 5000);
    owner.committed(second);
    const last = owner.checkpointPlan() as BatchPlan;
    await commitBatch(shared.redis, keys, 0, "w", again.token, last, 5000);
    expect(await shared.redis.hmget(keys.meta, "offset", "checkpoint")).toEqual([(entries[7] as [string, string[]])[0], (entries[7] as [string, string[]])[0]]);
    expect((await shared.redis.hkeys(keys.snapshots)).sort()).toEqual(["pump-0", "pump-1"]);
  });
});
