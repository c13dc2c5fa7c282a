import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, test } from "vitest";
import { openRedis } from "@leeway/fleet";
import { consumed, feed, recordedFleet, replayInProcess, SMALL_ENGINE, waitFor, writeConfig } from "./fleet-stream.js";
import { RedisServer } from "./redis-server.js";
import { expectExactlyOnce, killAndJoinRun, WorkerPool } from "./worker-pool.js";

const PARTITIONS = 6;
const records = recordedFleet(24, 600, 12, 10);
const expected = replayInProcess(records, SMALL_ENGINE);
const dir = mkdtempSync(join(tmpdir(), "leeway-fleet-"));
const config = writeConfig(dir, SMALL_ENGINE);
const pools: WorkerPool[] = [];
afterAll(async () => {
  for (const pool of pools) await pool.stopAll();
  rmSync(dir, { recursive: true, force: true });
});

function pool(url: string): WorkerPool {
  const p = new WorkerPool(["--redis", url, "--partitions", String(PARTITIONS), "--config", config, "--batch", "40", "--checkpoint-every", "5", "--lease-ms", "1500"]);
  pools.push(p);
  return p;
}

describe("fleet workers on a real redis-server (common practice, no source: exactly-once by an atomic commit of state and offset)", () => {
  test("three worker processes, one SIGKILLed mid-run and one added later, decide every record exactly once, byte for byte as the in-process replay", async () => {
    const server = await RedisServer.start();
    const redis = openRedis(server.url);
    try {
      await feed(redis, records, PARTITIONS);
      await killAndJoinRun(pool(server.url), redis, records.length, PARTITIONS);
      await expectExactlyOnce(redis, PARTITIONS, records, expected);
    } finally {
      for (const p of pools) await p.stopAll();
      await redis.quit().catch(() => undefined);
      await server.stop();
    }
  });

  test("a Redis restart mid-run (append-only file, appendfsync always) loses and repeats nothing", async () => {
    const server = await RedisServer.start();
    const redis = openRedis(server.url);
    try {
      await feed(redis, records, PARTITIONS);
      const workers = pool(server.url);
      workers.start();
      workers.start();
      await waitFor(async () => (await consumed(redis, PARTITIONS)) >= records.length * 0.3, 60_000, "30% of the records committed");
      await server.restart();
      await waitFor(async () => (await consumed(redis, PARTITIONS).catch(() => 0)) === records.length, 90_000, "every record committed after the restart");
      await workers.stopAll();
      await expectExactlyOnce(redis, PARTITIONS, records, expected);
    } finally {
      for (const p of pools) await p.stopAll();
      await redis.quit().catch(() => undefined);
      await server.stop();
    }
  });
});
