import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { fleetStatus, openRedis, type RedisClient } from "@leeway/fleet";
import { consumed, feed, readOutput, recordedFleet, replayInProcess, SMALL_ENGINE, startWorker, waitFor, writeConfig, type FleetRecord, type WorkerProcess } from "./fleet-stream.js";
import { RedisServer } from "./redis-server.js";

const PARTITIONS = 6;
const records: FleetRecord[] = recordedFleet(24, 700, 12, 10);
const samples = records.filter((r) => r.values !== null).length;
const expected = replayInProcess(records, SMALL_ENGINE);

let dir: string;
let config: string;
const workers: WorkerProcess[] = [];

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "leeway-fleet-"));
  config = writeConfig(dir, SMALL_ENGINE);
});
afterAll(async () => {
  for (const w of workers) if (w.child.exitCode === null) w.child.kill("SIGKILL");
  await Promise.all(workers.map((w) => w.exited));
  rmSync(dir, { recursive: true, force: true });
});

function worker(url: string): WorkerProcess {
  const w = startWorker(["--redis", url, "--partitions", String(PARTITIONS), "--config", config, "--batch", "40", "--lease-ms", "1500"]);
  workers.push(w);
  return w;
}

/** The fleet's output equals the in-process replay byte for byte, every sample decided once, every bad record dead-lettered once. */
async function expectExactlyOnce(redis: RedisClient): Promise<void> {
  const out = await readOutput(redis, PARTITIONS);
  expect(out.decidedInputs.length).toBe(samples);
  expect(new Set(out.decidedInputs).size).toBe(samples);
  expect([...out.decisions.keys()].sort()).toEqual([...expected.keys()].sort());
  for (const [stream, list] of expected) expect(out.decisions.get(stream), stream).toEqual(list);
  expect(out.dead.length).toBe(records.length - samples);
  expect(new Set(out.dead.map((d) => d.input)).size).toBe(out.dead.length);
}

/** Stops every worker still running with SIGTERM; returns their exit codes. */
async function stopAll(): Promise<(number | null)[]> {
  const running = workers.filter((w) => w.child.exitCode === null && w.child.signalCode === null);
  for (const w of running) w.child.kill("SIGTERM");
  const codes = await Promise.all(running.map((w) => w.exited));
  await Promise.all(workers.map((w) => w.exited));
  workers.length = 0;
  return codes;
}

describe("fleet workers on a real redis-server (common practice, no source: exactly-once by atomic commit of state and offset)", () => {
  test("three worker processes, one SIGKILLed mid-run and one added later, decide every record exactly once, byte for byte as the in-process replay", async () => {
    const server = await RedisServer.start();
    const redis = openRedis(server.url);
    try {
      await feed(redis, records, PARTITIONS);
      const [a] = [worker(server.url), worker(server.url), worker(server.url)];
      await waitFor(async () => (await consumed(redis, PARTITIONS)) >= records.length * 0.2, 60_000, "a fifth of the records committed");
      (a as WorkerProcess).child.kill("SIGKILL");
      const killedAt = await consumed(redis, PARTITIONS);
      await waitFor(async () => (await consumed(redis, PARTITIONS)) >= Math.max(killedAt + 1, records.length * 0.5), 60_000, "half of the records committed");
      const late = worker(server.url);
      await waitFor(async () => (await consumed(redis, PARTITIONS)) === records.length, 90_000, "every record committed");
      expect(killedAt).toBeLessThan(records.length);
      const status = await fleetStatus(redis, { partitions: PARTITIONS });
      expect(status.totalLag).toBe(0);
      expect(Math.max(...status.partitions.map((p) => p.token))).toBeGreaterThan(1); // the killed worker's partitions changed hands
      expect(await stopAll()).toEqual([0, 0, 0]); // graceful stop: batch committed, leases released
      expect(late.log.join("")).toMatch(/partition \d+ acquired/);
      await expectExactlyOnce(redis);
    } finally {
      await stopAll();
      await redis.quit().catch(() => undefined);
      await server.stop();
    }
  });

  test("a Redis restart mid-run (append-only file, appendfsync always) loses and repeats nothing", async () => {
    const server = await RedisServer.start();
    const redis = openRedis(server.url);
    try {
      await feed(redis, records, PARTITIONS);
      worker(server.url);
      worker(server.url);
      await waitFor(async () => (await consumed(redis, PARTITIONS)) >= records.length * 0.3, 60_000, "30% of the records committed");
      await server.restart();
      await waitFor(async () => (await consumed(redis, PARTITIONS).catch(() => 0)) === records.length, 90_000, "every record committed after the restart");
      await stopAll();
      await expectExactlyOnce(redis);
    } finally {
      await stopAll();
      await redis.quit().catch(() => undefined);
      await server.stop();
    }
  });
});
