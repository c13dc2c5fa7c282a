import { execFile } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { promisify } from "node:util";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { openRedis, partitionKeys, type RedisClient } from "@leeway/fleet";
import { feed, recordedFleet, replayInProcess, SMALL_ENGINE, waitFor, writeConfig } from "./fleet-stream.js";
import { RedisServer } from "./redis-server.js";
import { expectExactlyOnce, killAndJoinRun, WorkerPool } from "./worker-pool.js";

const run = promisify(execFile);
const PARTITIONS = 6;
const records = recordedFleet(18, 500, 31, 6);
const expected = replayInProcess(records, SMALL_ENGINE);
const dir = mkdtempSync(join(tmpdir(), "leeway-fleet-cluster-"));
const nodes: RedisServer[] = [];
let redis: RedisClient | null = null;
let pool: WorkerPool | null = null;

beforeAll(async () => {
  for (let i = 0; i < 3; i++) nodes.push(await RedisServer.start({ cluster: true }));
  await run("redis-cli", ["--cluster", "create", ...nodes.map((n) => `127.0.0.1:${n.port}`), "--cluster-replicas", "0", "--cluster-yes"]);
  await waitFor(async () => {
    const states = await Promise.all(nodes.map(async (n) => (await run("redis-cli", ["-p", String(n.port), "cluster", "info"])).stdout));
    return states.every((s) => s.includes("cluster_state:ok"));
  }, 30_000, "the three-node cluster to report cluster_state:ok");
  redis = openRedis(nodes[0]?.url as string, { cluster: true });
});
afterAll(async () => {
  await pool?.stopAll();
  await redis?.quit().catch(() => undefined);
  for (const n of nodes) await n.stop();
  rmSync(dir, { recursive: true, force: true });
});

describe("the fleet on a three-node Redis Cluster on loopback (common practice, no source)", () => {
  test("partitions spread over the three shards, each partition's keys on one shard; the SIGKILL-and-join run decides every record exactly once", async () => {
    const client = redis as RedisClient;
    await feed(client, records, PARTITIONS);
    pool = new WorkerPool(["--redis", nodes[0]?.url as string, "--cluster", "--partitions", String(PARTITIONS), "--config", writeConfig(dir, SMALL_ENGINE), "--batch", "40", "--checkpoint-every", "5", "--lease-ms", "1500"]);
    await killAndJoinRun(pool, client, records.length, PARTITIONS);
    await expectExactlyOnce(client, PARTITIONS, records, expected);
    // Where each partition's keys live: every key of a partition on one node, the partitions on all three.
    const holders = new Map<number, Set<number>>();
    for (const [i, node] of nodes.entries()) {
      const single = openRedis(node.url);
      for (let p = 0; p < PARTITIONS; p++) {
        const keys = Object.values(partitionKeys("leeway", p));
        const present = await Promise.all(keys.map((k) => single.exists(k).catch(() => 0)));
        if (present.some((x) => x === 1)) (holders.get(p) ?? holders.set(p, new Set()).get(p))?.add(i);
      }
      await single.quit();
    }
    expect([...holders.values()].every((set) => set.size === 1)).toBe(true);
    expect(new Set([...holders.values()].map((set) => [...set][0])).size).toBe(3);
  });
});
