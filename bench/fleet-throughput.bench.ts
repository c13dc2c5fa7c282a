import { mkdirSync, writeFileSync } from "node:fs";
import { test } from "vitest";
import { DecisionEngine, type DecisionEngineOptions } from "@leeway/policy";
import { encodeEngine, FleetFeeder, FleetWorker, openRedis, partitionKeys, partitionOf, type FleetWorkerOptions, type RedisClient } from "@leeway/fleet";
import { RedisServer } from "../test/fleet/redis-server.js";
import { consumed, waitFor } from "../test/fleet/fleet-stream.js";

// Score-only throughput of one in-process worker on one real redis-server
// (appendfsync always, as in the tests), in rounds: every round starts a
// fresh fleet whose engines are all past commissioning and calibration
// (their snapshots written straight into Redis), publishes the samples, and
// times the worker from its start until it has committed every sample and
// stopped (its last checkpoint included). Samples per second by wall time,
// by the worker process's CPU time and by Redis's CPU time, min/median/max
// over the rounds; the configurations alternate round by round.
// Figures go to bench/results/fleet-throughput.json and docs/fleet.md.

const PARTITIONS = 16;
const STREAMS = Number(process.env.FLEET_TP_STREAMS ?? 2000);
const SAMPLES = Number(process.env.FLEET_TP_SAMPLES ?? 100);
const ROUNDS = Number(process.env.FLEET_TP_ROUNDS ?? 3);
const ENGINE: DecisionEngineOptions = { seed: 1 };

interface Config {
  name: string;
  worker: Partial<FleetWorkerOptions>;
}

// FLEET_TP_BEFORE=1 runs only the worker options the fleet had before checkpoints (a snapshot per batch).
const CONFIGS: Config[] =
  process.env.FLEET_TP_BEFORE === "1"
    ? [{ name: "batch 1000, snapshots every batch (before)", worker: { batch: 1000 } }]
    : [
        { name: "batch 1000, checkpoint every batch", worker: { batch: 1000, checkpointEvery: 1 } as Partial<FleetWorkerOptions> },
        { name: "batch 1000, checkpoint every 20 batches", worker: { batch: 1000, checkpointEvery: 20 } as Partial<FleetWorkerOptions> },
        { name: "batch 5000, checkpoint every 20 batches", worker: { batch: 5000, checkpointEvery: 20 } as Partial<FleetWorkerOptions> },
      ];

function score(s: number, i: number): number {
  return 1 + 0.1 * Math.sin(0.37 * i + 1.3 * s) + 0.05 * Math.sin(1.91 * i + s);
}

/** A score-only engine in its watching phase (after commissioning and calibration), as stored bytes. */
function steadyEngineBytes(): Buffer {
  const engine = new DecisionEngine(ENGINE);
  for (let i = 0; i < 3000; i++) engine.observeScores(score(0, i));
  if (engine.phase !== "watching") throw new Error(`the bench's engines should be watching, got ${engine.phase}`);
  return encodeEngine(engine);
}

/** A fresh fleet under `prefix`: every stream's engine stored in its watching phase, SAMPLES samples per stream published. */
async function prepareFleet(redis: RedisClient, prefix: string, bytes: Buffer): Promise<number> {
  const pipeline = redis.pipeline();
  const feeder = new FleetFeeder(redis, { prefix, partitions: PARTITIONS });
  for (let s = 0; s < STREAMS; s++) {
    const stream = `pump-${s}`;
    pipeline.hset(partitionKeys(prefix, partitionOf(stream, PARTITIONS)).snapshots, stream, bytes);
  }
  await pipeline.exec();
  let total = 0;
  for (let i = 0; i < SAMPLES; i++) {
    for (let s = 0; s < STREAMS; s++) feeder.sample(`pump-${s}`, `site-${s % 50}`, [score(s, 3000 + i)]);
    if (feeder.queued >= 20_000) total += await feeder.flush();
  }
  return total + (await feeder.flush());
}

async function redisCpuSeconds(redis: RedisClient): Promise<number> {
  const info = String(await redis.info("cpu"));
  return Number(/used_cpu_user:([\d.]+)/.exec(info)?.[1]) + Number(/used_cpu_sys:([\d.]+)/.exec(info)?.[1]);
}

async function drain(url: string, redis: RedisClient, prefix: string, total: number, config: Config): Promise<{ wall: number; cpu: number; redisCpu: number }> {
  const client = openRedis(url);
  const worker = new FleetWorker(client, { prefix, partitions: PARTITIONS, engine: ENGINE, leaseMs: 60_000, idleMs: 5, ...config.worker });
  const redis0 = await redisCpuSeconds(redis);
  const cpu0 = process.cpuUsage();
  const t0 = performance.now();
  const running = worker.run();
  await waitFor(async () => (await consumed(redis, PARTITIONS, prefix)) === total, 900_000, "drained");
  worker.stop();
  await running;
  const wall = (performance.now() - t0) / 1000;
  const used = process.cpuUsage(cpu0);
  const redisCpu = (await redisCpuSeconds(redis)) - redis0;
  await client.quit();
  return { wall: total / wall, cpu: total / ((used.user + used.system) / 1e6), redisCpu: total / redisCpu };
}

function spreadOf(values: number[]): { min: number; median: number; max: number } {
  const s = [...values].sort((a, b) => a - b);
  return { min: Math.round(s[0] as number), median: Math.round(s[s.length >> 1] as number), max: Math.round(s[s.length - 1] as number) };
}

test("fleet: score-only samples per second of one worker, by checkpoint interval and batch size", async () => {
  const server = await RedisServer.start();
  const redis = openRedis(server.url);
  const bytes = steadyEngineBytes();
  const results = CONFIGS.map(() => ({ wall: [] as number[], cpu: [] as number[], redisCpu: [] as number[] }));
  try {
    for (let round = 0; round < ROUNDS; round++) {
      for (const [k, config] of CONFIGS.entries()) {
        const prefix = `tp${round}x${k}`;
        const total = await prepareFleet(redis, prefix, bytes);
        const r = await drain(server.url, redis, prefix, total, config);
        for (const key of ["wall", "cpu", "redisCpu"] as const) (results[k] as Record<typeof key, number[]>)[key].push(r[key]);
        console.log(`round ${round + 1}: ${config.name}: ${Math.round(r.wall)} samples/s wall, ${Math.round(r.cpu)} per worker CPU s, ${Math.round(r.redisCpu)} per Redis CPU s`);
        await redis.flushall();
      }
    }
  } finally {
    await redis.quit().catch(() => undefined);
    await server.stop();
  }
  const rows = CONFIGS.map((c, k) => ({
    name: c.name,
    streams: STREAMS,
    samplesPerStream: SAMPLES,
    partitions: PARTITIONS,
    rounds: ROUNDS,
    snapshotBytes: bytes.length,
    samplesPerSecondWall: spreadOf((results[k] as { wall: number[] }).wall),
    samplesPerWorkerCpuSecond: spreadOf((results[k] as { cpu: number[] }).cpu),
    samplesPerRedisCpuSecond: spreadOf((results[k] as { redisCpu: number[] }).redisCpu),
  }));
  console.log(JSON.stringify(rows, null, 2));
  mkdirSync(new URL("./results/", import.meta.url), { recursive: true });
  writeFileSync(new URL(`./results/fleet-throughput${process.env.FLEET_TP_BEFORE === "1" ? "-before" : ""}.json`, import.meta.url), JSON.stringify(rows, null, 2) + "\n");
});
