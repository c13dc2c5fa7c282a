import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { test } from "vitest";
import { DecisionEngine, type DecisionEngineOptions } from "@leeway/policy";
import { encodeEngine, FleetFeeder, FleetWorker, openRedis, partitionKeys, type RedisClient } from "@leeway/fleet";
import { RedisServer } from "../test/fleet/redis-server.js";
import { consumed, startWorker, waitFor, writeConfig } from "../test/fleet/fleet-stream.js";

// The fleet on one real redis-server (appendfsync always, as in the tests):
// samples per second per worker, one vs two worker processes, publish →
// decision latency, Redis memory and snapshot bytes per stream.
// Figures go to bench/results/fleet.json and docs/fleet.md.

const PARTITIONS = 16;
// Default engine options: the measured samples fall in each stream's commissioning window (600 samples);
// the steady-state snapshot (after calibration) is measured separately below.
const SCORE_ENGINE: DecisionEngineOptions = { seed: 1 };
const FEATURE_ENGINE: DecisionEngineOptions = { inputs: 32, hidden: 8, seed: 1 };

function values(s: number, i: number, width: number): number[] {
  const out: number[] = new Array(width);
  for (let k = 0; k < width; k++) out[k] = 1 + 0.1 * Math.sin(0.37 * i + 1.3 * s + 0.11 * k);
  return out;
}

async function publish(redis: RedisClient, prefix: string, streams: number, samples: number, width: number): Promise<number> {
  const feeder = new FleetFeeder(redis, { prefix, partitions: PARTITIONS });
  let total = 0;
  for (let i = 0; i < samples; i++) {
    for (let s = 0; s < streams; s++) feeder.sample(`pump-${s}`, `site-${s % 50}`, values(s, i, width));
    if (feeder.queued >= 20_000) total += await feeder.flush();
  }
  return total + (await feeder.flush());
}

/** One in-process worker drains a fleet: samples/s by wall time and by this process's CPU time. */
async function drainInProcess(url: string, redis: RedisClient, prefix: string, total: number, engine: DecisionEngineOptions, batch: number): Promise<{ wallPerS: number; cpuPerS: number; seconds: number }> {
  const client = openRedis(url);
  const worker = new FleetWorker(client, { prefix, partitions: PARTITIONS, engine, batch, leaseMs: 30_000 });
  const cpu0 = process.cpuUsage();
  const t0 = performance.now();
  const running = worker.run();
  await waitFor(async () => (await consumed(redis, PARTITIONS, prefix)) === total, 900_000, "drained");
  const seconds = (performance.now() - t0) / 1000;
  const cpu = process.cpuUsage(cpu0);
  worker.stop();
  await running;
  await client.quit();
  return { wallPerS: total / seconds, cpuPerS: total / ((cpu.user + cpu.system) / 1e6), seconds };
}

/** `n` worker processes drain a fleet: samples/s by wall time. */
async function drainProcesses(url: string, redis: RedisClient, prefix: string, total: number, config: string, n: number, batch: number): Promise<number> {
  const t0 = performance.now();
  const workers = Array.from({ length: n }, () => startWorker(["--redis", url, "--prefix", prefix, "--partitions", String(PARTITIONS), "--config", config, "--batch", String(batch), "--lease-ms", "5000"]));
  try {
    await waitFor(async () => (await consumed(redis, PARTITIONS, prefix)) === total, 900_000, "drained");
  } finally {
    for (const w of workers) w.child.kill("SIGTERM");
    await Promise.all(workers.map((w) => w.exited));
  }
  return total / ((performance.now() - t0) / 1000);
}

async function snapshotStats(redis: RedisClient, prefix: string): Promise<{ bytesPerStream: number; redisBytesPerStream: number; streams: number }> {
  let bytes = 0;
  let redisBytes = 0;
  let streams = 0;
  for (let p = 0; p < PARTITIONS; p++) {
    const k = partitionKeys(prefix, p).snapshots;
    const fields = await redis.hkeys(k);
    for (const f of fields) bytes += await redis.hstrlen(k, f);
    streams += fields.length;
    redisBytes += Number((await redis.call("MEMORY", "USAGE", k, "SAMPLES", "0")) ?? 0);
  }
  return { bytesPerStream: bytes / streams, redisBytesPerStream: redisBytes / streams, streams };
}

/** Publishes at a steady rate to a caught-up worker; p50/p99 of output entry time − publish time, in ms. */
async function latency(url: string, redis: RedisClient, prefix: string, streams: number, ratePerS: number, seconds: number): Promise<{ p50: number; p99: number; max: number }> {
  const client = openRedis(url);
  const worker = new FleetWorker(client, { prefix, partitions: PARTITIONS, engine: SCORE_ENGINE, batch: 2000, leaseMs: 30_000, idleMs: 5 });
  const running = worker.run();
  const feeder = new FleetFeeder(redis, { prefix, partitions: PARTITIONS });
  let sent = 0;
  const start = Date.now();
  for (let tick = 0; tick < seconds * 20; tick++) {
    const due = Math.floor(((tick + 1) * ratePerS) / 20);
    for (; sent < due; sent++) feeder.sample(`pump-${sent % streams}`, "site-0", [1 + 0.1 * Math.sin(sent)], Date.now());
    await feeder.flush();
    const wait = start + (tick + 1) * 50 - Date.now();
    if (wait > 0) await new Promise((r) => setTimeout(r, wait));
  }
  await waitFor(async () => (await consumed(redis, PARTITIONS, prefix)) === sent, 120_000, "latency run drained");
  worker.stop();
  await running;
  await client.quit();
  const lags: number[] = [];
  for (let p = 0; p < PARTITIONS; p++) {
    for (const [id, fields] of (await redis.xrange(partitionKeys(prefix, p).output, "-", "+")) as [string, string[]][]) {
      const t = fields.indexOf("t");
      if (t >= 0) lags.push(Number(id.split("-")[0]) - Number(fields[t + 1]));
    }
  }
  lags.sort((a, b) => a - b);
  const q = (f: number): number => lags[Math.min(lags.length - 1, Math.floor(f * lags.length))] as number;
  return { p50: q(0.5), p99: q(0.99), max: lags[lags.length - 1] as number };
}

function steadySnapshotBytes(): { json: number; stored: number } {
  const engine = new DecisionEngine({ seed: 1 }); // defaults: 600 commissioning, 600 calibration
  for (let i = 0; i < 20_000; i++) engine.observeScores(1 + 0.1 * Math.sin(0.37 * i) + 0.05 * Math.sin(1.91 * i));
  return { json: JSON.stringify(engine.snapshot()).length, stored: encodeEngine(engine).length };
}

test("fleet: throughput, scaling, latency, memory", async () => {
  const rows: Record<string, unknown> = {};
  const dir = mkdtempSync(join(tmpdir(), "leeway-fleet-bench-"));
  const server = await RedisServer.start();
  const redis = openRedis(server.url);
  try {
    const scoreStreams = Number(process.env.FLEET_BENCH_STREAMS ?? 10_000);
    const scoreSamples = Number(process.env.FLEET_BENCH_SAMPLES ?? 20);
    const total = await publish(redis, "s1", scoreStreams, scoreSamples, 1);
    rows.scoreOnly = { streams: scoreStreams, samples: total, ...(await drainInProcess(server.url, redis, "s1", total, SCORE_ENGINE, 5000)) };
    rows.scoreSnapshots = await snapshotStats(redis, "s1");
    rows.steadyScoreSnapshot = steadySnapshotBytes();
    const info = String(await redis.info("memory"));
    rows.redisUsedMemory = Number(/used_memory:(\d+)/.exec(info)?.[1]);
    const config = writeConfig(dir, SCORE_ENGINE);
    const scaleStreams = Math.round(scoreStreams / 4);
    const t1 = await publish(redis, "x1", scaleStreams, scoreSamples, 1);
    const one = await drainProcesses(server.url, redis, "x1", t1, config, 1, 5000);
    const t2 = await publish(redis, "x2", scaleStreams, scoreSamples, 1);
    const two = await drainProcesses(server.url, redis, "x2", t2, config, 2, 5000);
    rows.scaling = { streams: scaleStreams, samples: t1, oneWorkerPerS: one, twoWorkersPerS: two, ratio: two / one };
    rows.latency = { ratePerS: 2000, streams: 2000, ...(await latency(server.url, redis, "lat", 2000, 2000, 10)) };
    const featureStreams = Number(process.env.FLEET_BENCH_FEATURE_STREAMS ?? 1000);
    const ft = await publish(redis, "f1", featureStreams, 20, 32);
    console.log(JSON.stringify(rows));
    rows.featureMode = { streams: featureStreams, inputs: 32, samples: ft, ...(await drainInProcess(server.url, redis, "f1", ft, FEATURE_ENGINE, 2000)) };
    rows.featureSnapshots = await snapshotStats(redis, "f1");
  } finally {
    await redis.quit().catch(() => undefined);
    await server.stop();
    rmSync(dir, { recursive: true, force: true });
  }
  console.log(JSON.stringify(rows, null, 2));
  mkdirSync(new URL("./results/", import.meta.url), { recursive: true });
  writeFileSync(new URL("./results/fleet.json", import.meta.url), JSON.stringify(rows, null, 2));
});
