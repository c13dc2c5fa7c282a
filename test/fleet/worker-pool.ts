import { expect } from "vitest";
import { fleetStatus, type RedisClient } from "@leeway/fleet";
import { consumed, readOutput, startWorker, waitFor, type FleetRecord, type WorkerProcess } from "./fleet-stream.js";

/** `leeway fleet worker` processes started by one test, all stopped by {@link WorkerPool.stopAll}. */
export class WorkerPool {
  readonly #flags: string[];
  readonly workers: WorkerProcess[] = [];
  constructor(flags: string[]) {
    this.#flags = flags;
  }
  start(): WorkerProcess {
    const w = startWorker(this.#flags);
    this.workers.push(w);
    return w;
  }
  /** SIGTERM to every worker still running (SIGKILL to any that has not stopped in 30 s); their exit codes. */
  async stopAll(): Promise<(number | null)[]> {
    const running = this.workers.filter((w) => w.child.exitCode === null && w.child.signalCode === null);
    for (const w of running) w.child.kill("SIGTERM");
    const timer = setTimeout(() => running.forEach((w) => w.child.kill("SIGKILL")), 30_000);
    const codes = await Promise.all(running.map((w) => w.exited));
    clearTimeout(timer);
    await Promise.all(this.workers.map((w) => w.exited));
    this.workers.length = 0;
    return codes;
  }
}

/**
 * The run of the exactly-once tests: three workers start, one is SIGKILLed
 * once a fifth of the records is committed, a fourth joins at half; waits
 * until everything is committed, stops the survivors gracefully.
 */
export async function killAndJoinRun(pool: WorkerPool, redis: RedisClient, total: number, partitions: number): Promise<void> {
  const [victim] = [pool.start(), pool.start(), pool.start()];
  await waitFor(async () => (await consumed(redis, partitions)) >= total * 0.2, 90_000, "a fifth of the records committed");
  (victim as WorkerProcess).child.kill("SIGKILL");
  const killedAt = await consumed(redis, partitions);
  expect(killedAt).toBeLessThan(total);
  await waitFor(async () => (await consumed(redis, partitions)) >= Math.max(killedAt + 1, total * 0.5), 90_000, "half of the records committed");
  const late = pool.start();
  // The added worker must be up (its signal handlers set) before the run may end and stopAll signal it.
  await waitFor(async () => /partition \d+ acquired/.test(late.log.join("")), 90_000, "the added worker to take a partition");
  await waitFor(async () => (await consumed(redis, partitions)) === total, 120_000, "every record committed");
  const status = await fleetStatus(redis, { partitions });
  expect(status.totalLag).toBe(0);
  expect(Math.max(...status.partitions.map((p) => p.token))).toBeGreaterThan(1); // the killed worker's partitions changed hands
  expect(await pool.stopAll()).toEqual([0, 0, 0]); // graceful stop: batch committed, leases released
}

/** The fleet's output equals the in-process replay byte for byte, every sample decided once, every bad record dead-lettered once. */
export async function expectExactlyOnce(redis: RedisClient, partitions: number, records: readonly FleetRecord[], expected: Map<string, string[]>): Promise<void> {
  const samples = records.filter((r) => r.values !== null).length;
  const out = await readOutput(redis, partitions);
  expect(out.decidedInputs.length).toBe(samples);
  expect(new Set(out.decidedInputs).size).toBe(samples);
  expect([...out.decisions.keys()].sort()).toEqual([...expected.keys()].sort());
  for (const [stream, list] of expected) expect(out.decisions.get(stream), stream).toEqual(list);
  expect(out.dead.length).toBe(records.length - samples);
  expect(new Set(out.dead.map((d) => d.input)).size).toBe(out.dead.length);
}
