import { randomUUID } from "node:crypto";
import { hostname } from "node:os";
import { integerInRange, OptionError, optionsObject } from "@leeway/core";
import { DecisionEngine, type DecisionEngineOptions } from "@leeway/policy";
import { commitBatch, FencedError } from "./commit.js";
import { checkPrefix, fleetKeys, fnv1a, partitionKeys, type PartitionKeys } from "./keys.js";
import { acquireLease, releaseLease, renewLease } from "./lease.js";
import { PartitionEngines, type StoredStream, type StreamEntry } from "./partition.js";
import type { RedisClient } from "./scripts.js";

/** Options of {@link FleetWorker}. */
export interface FleetWorkerOptions {
  /** Key prefix of the fleet. Default "leeway". */
  prefix?: string;
  /** Number of partitions of the fleet (fixed for its lifetime), 1 to 65536. */
  partitions: number;
  /** The partitions this worker may own. Default: all. */
  only?: readonly number[];
  /** Options of every stream's {@link DecisionEngine} (give `inputs` for feature mode). Default {}. */
  engine?: DecisionEngineOptions;
  /** Input records read and committed per partition per batch, 1 to 100000. Default 1000. */
  batch?: number;
  /**
   * Batches per checkpoint, 1 to 10000: how often a partition's commit also
   * stores the snapshots of the engines changed since the last one. Fewer
   * checkpoints cost less (a snapshot is serialised and compressed once per
   * checkpoint instead of once per batch) but a new owner replays up to
   * `checkpointEvery × batch` records before it decides anything new. Default 20.
   */
  checkpointEvery?: number;
  /** Lease time to live, in milliseconds, 200 to 600000: how long a dead worker's partitions wait for a new owner. Default 10000. */
  leaseMs?: number;
  /** Pause when no partition had input, in milliseconds, 1 to 10000. Default 20. */
  idleMs?: number;
  /** The owner name written into leases (unique per worker). Default `<host>:<pid>:<random>`. */
  owner?: string;
}

/** Counts a worker reports (cumulative since it started). */
export interface WorkerProgress {
  owner: string;
  partitions: number[];
  decisions: number;
  deadLetters: number;
  batches: number;
  /** Input entries not yet committed in the owned partitions (as of the last lease round). */
  lag: number;
}

/** What happened to a worker's leases, for its log. */
export interface WorkerEvent {
  kind: "acquired" | "replayed" | "released" | "lost" | "fenced" | "error";
  partition: number;
  message: string;
}

const NAME = "FleetWorker";
const KNOWN = ["prefix", "partitions", "only", "engine", "batch", "checkpointEvery", "leaseMs", "idleMs", "owner"] as const;

/**
 * A worker of the fleet: owns partitions through leases with fencing tokens,
 * restores each stream's engine lazily from its snapshot, reads each owned
 * partition's input stream in batches and commits every batch in one atomic
 * script (decisions, dead letters, offset; and every `checkpointEvery`
 * batches the changed snapshots). Killed at any instant, it loses and
 * repeats nothing: a new owner restores the engines of the last checkpoint,
 * replays the records up to the last commit without writing their decisions
 * again, and continues from there.
 * Workers share the partitions evenly: each takes its fair share of the live
 * workers and gives extra partitions up at its next lease round.
 * @example
 * const worker = new FleetWorker(openRedis("redis://127.0.0.1:6379"), { partitions: 16, engine: { seed: 1 } });
 * process.once("SIGTERM", () => worker.stop());
 * await worker.run(); // until stop(): the batch in hand is committed, the leases released
 */
export class FleetWorker {
  readonly owner: string;
  readonly #client: RedisClient;
  readonly #prefix: string;
  readonly #eligible: number[];
  readonly #engineOptions: DecisionEngineOptions;
  readonly #inputs: number | null;
  readonly #allowNonFinite: boolean;
  readonly #batch: number;
  readonly #checkpointEvery: number;
  readonly #leaseMs: number;
  readonly #idleMs: number;
  readonly #keys: PartitionKeys[];
  readonly #owned = new Map<number, PartitionEngines>();
  #stopping = false;
  #wake: (() => void) | null = null;
  readonly #progress: WorkerProgress;
  /** Called after every lease round with the counts so far. */
  onProgress: ((progress: WorkerProgress) => void) | null = null;
  /** Called when a lease is taken, given up or lost. */
  onEvent: ((event: WorkerEvent) => void) | null = null;

  constructor(client: RedisClient, options: FleetWorkerOptions) {
    const o = optionsObject<FleetWorkerOptions>(NAME, options, KNOWN);
    this.#client = client;
    this.#prefix = checkPrefix(NAME, o.prefix ?? "leeway");
    const partitions = integerInRange(NAME, "partitions", o.partitions, 1, 1 << 16);
    if (o.only !== undefined && (!Array.isArray(o.only) || o.only.length === 0)) throw new OptionError(NAME, "only", o.only, `a non-empty array of partition numbers in [0, ${partitions - 1}]`);
    this.#eligible = o.only === undefined ? Array.from({ length: partitions }, (_, i) => i) : [...new Set(o.only.map((p) => integerInRange(NAME, "only", p, 0, partitions - 1)))];
    this.#engineOptions = o.engine ?? {};
    const probe = new DecisionEngine(this.#engineOptions); // refuses bad engine options now, not at the first record
    this.#inputs = probe.mode === "features" ? (this.#engineOptions.inputs as number) : null;
    this.#allowNonFinite = this.#engineOptions.nonFinite === "skip";
    this.#batch = integerInRange(NAME, "batch", o.batch ?? 1000, 1, 100_000);
    this.#checkpointEvery = integerInRange(NAME, "checkpointEvery", o.checkpointEvery ?? 20, 1, 10_000);
    this.#leaseMs = integerInRange(NAME, "leaseMs", o.leaseMs ?? 10_000, 200, 600_000);
    this.#idleMs = integerInRange(NAME, "idleMs", o.idleMs ?? 20, 1, 10_000);
    if (o.owner !== undefined && (typeof o.owner !== "string" || o.owner.length === 0 || o.owner.length > 200)) throw new OptionError(NAME, "owner", o.owner, "a string of 1 to 200 characters");
    this.owner = o.owner ?? `${hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`;
    this.#keys = Array.from({ length: partitions }, (_, p) => partitionKeys(this.#prefix, p));
    this.#progress = { owner: this.owner, partitions: [], decisions: 0, deadLetters: 0, batches: 0, lag: 0 };
  }

  /** The partitions this worker owns now. */
  get partitions(): number[] {
    return [...this.#owned.keys()].sort((a, b) => a - b);
  }

  /** Runs until {@link FleetWorker.stop}: lease rounds every leaseMs/3, batches in between. */
  async run(): Promise<void> {
    let nextRound = 0;
    while (!this.#stopping) {
      if (Date.now() >= nextRound) {
        await this.#leaseRound().catch((error: unknown) => this.#event("error", -1, `lease round failed: ${(error as Error).message}`));
        nextRound = Date.now() + Math.floor(this.#leaseMs / 3);
      }
      const worked = await this.#batchRound();
      if (!worked && !this.#stopping) await this.#sleep(this.#owned.size === 0 ? Math.min(nextRound - Date.now(), 250) : this.#idleMs);
    }
    await this.#releaseAll();
  }

  /** Asks {@link FleetWorker.run} to stop after the batch in hand is committed; the leases are then released. */
  stop(): void {
    this.#stopping = true;
    this.#wake?.();
  }

  #sleep(ms: number): Promise<void> {
    return new Promise((resolve) => {
      const timer = setTimeout(done, Math.max(1, ms));
      function done(): void {
        clearTimeout(timer);
        resolve();
      }
      this.#wake = done;
    });
  }

  #event(kind: WorkerEvent["kind"], partition: number, message: string): void {
    this.onEvent?.({ kind, partition, message });
  }

  /** Registers as live, renews, gives up extra partitions, takes up to the fair share. */
  async #leaseRound(): Promise<void> {
    const now = Date.now();
    const { workers } = fleetKeys(this.#prefix);
    await this.#client.zadd(workers, now, this.owner);
    await this.#client.zremrangebyscore(workers, "-inf", now - 3 * this.#leaseMs);
    const live = Math.max(1, await this.#client.zcard(workers));
    const fair = Math.ceil(this.#eligible.length / live);
    for (const [p, part] of [...this.#owned]) {
      if (!(await renewLease(this.#client, this.#keys[p] as PartitionKeys, this.owner, part.token, this.#leaseMs))) {
        this.#owned.delete(p);
        this.#event("lost", p, `lease of partition ${p} lost (a newer owner holds it)`);
      }
    }
    for (const p of this.partitions.reverse()) {
      if (this.#owned.size <= fair || this.#stopping) break;
      await this.#release(p, "rebalance");
    }
    const start = fnv1a(this.owner) % this.#eligible.length;
    for (let k = 0; k < this.#eligible.length && this.#owned.size < fair && !this.#stopping; k++) {
      const p = this.#eligible[(start + k) % this.#eligible.length] as number;
      if (this.#owned.has(p)) continue;
      const lease = await acquireLease(this.#client, this.#keys[p] as PartitionKeys, this.owner, this.#leaseMs);
      if (lease === null) continue;
      this.#owned.set(p, new PartitionEngines(p, lease.token, lease, () => new DecisionEngine(this.#engineOptions), { inputs: this.#inputs, allowNonFinite: this.#allowNonFinite, checkpointEvery: this.#checkpointEvery }));
      this.#event("acquired", p, `partition ${p} acquired (token ${lease.token}, offset ${lease.offset}, checkpoint ${lease.checkpoint})`);
    }
    let lag = 0;
    for (const [p, part] of this.#owned) lag += Math.max(0, (await entriesAdded(this.#client, (this.#keys[p] as PartitionKeys).input)) - part.consumed);
    this.#progress.partitions = this.partitions;
    this.#progress.lag = lag;
    this.onProgress?.({ ...this.#progress, partitions: [...this.#progress.partitions] });
  }

  async #release(p: number, why: string): Promise<void> {
    const part = this.#owned.get(p);
    if (part === undefined) return;
    this.#owned.delete(p);
    const plan = part.checkpointPlan();
    if (plan !== null) {
      // The next owner then starts from the committed offset with nothing to replay.
      await commitBatch(this.#client, this.#keys[p] as PartitionKeys, p, this.owner, part.token, plan, this.#leaseMs).then(
        () => part.committed(plan),
        (error: unknown) => this.#event("error", p, `last checkpoint of partition ${p} not written: ${(error as Error).message}`),
      );
    }
    await releaseLease(this.#client, this.#keys[p] as PartitionKeys, this.owner, part.token).catch(() => false);
    this.#event("released", p, `partition ${p} released (${why})`);
  }

  async #releaseAll(): Promise<void> {
    for (const p of this.partitions) await this.#release(p, "stop");
    await this.#client.zrem(fleetKeys(this.#prefix).workers, this.owner).catch(() => 0);
  }

  /** One batch for every owned partition that has input; true when any had. */
  async #batchRound(): Promise<boolean> {
    const results = await Promise.all([...this.#owned.values()].map((part) => this.#partitionBatch(part)));
    return results.some((worked) => worked);
  }

  async #partitionBatch(part: PartitionEngines): Promise<boolean> {
    const keys = this.#keys[part.partition] as PartitionKeys;
    try {
      if (part.replaying) return await this.#replayBatch(part, keys);
      const entries = (await this.#client.xrange(keys.input, `(${part.offset}`, "+", "COUNT", this.#batch)) as StreamEntry[];
      if (entries.length === 0) return false;
      const stored = await this.#loadStreams(keys, part.missing(entries));
      if (this.#owned.get(part.partition) !== part) return false;
      const plan = part.decide(entries, stored);
      await commitBatch(this.#client, keys, part.partition, this.owner, part.token, plan, this.#leaseMs);
      part.committed(plan);
      this.#progress.decisions += plan.decisions;
      this.#progress.deadLetters += plan.dead.length;
      this.#progress.batches++;
      return true;
    } catch (error) {
      // The engines may be ahead of Redis now: drop them; the next lease round reloads the committed state.
      if (this.#owned.get(part.partition) === part) this.#owned.delete(part.partition);
      const fenced = error instanceof FencedError;
      this.#event(fenced ? "fenced" : "error", part.partition, fenced ? `commit refused, partition dropped: ${error.message}` : `partition ${part.partition} dropped after an error: ${(error as Error).message}`);
      if (!fenced) await this.#sleep(this.#idleMs * 10);
      return false;
    }
  }

  /** Replays one batch of the records between the checkpoint and the committed offset (nothing is written). */
  async #replayBatch(part: PartitionEngines, keys: PartitionKeys): Promise<boolean> {
    const entries = (await this.#client.xrange(keys.input, `(${part.cursor}`, part.offset, "COUNT", this.#batch)) as StreamEntry[];
    if (entries.length === 0) throw new Error(`the input records after checkpoint ${part.cursor} up to the committed offset ${part.offset} are gone (was the input trimmed above the checkpoint?)`);
    const stored = await this.#loadStreams(keys, part.missing(entries));
    if (this.#owned.get(part.partition) !== part) return false;
    part.replay(entries, stored);
    if (!part.replaying) this.#event("replayed", part.partition, `partition ${part.partition}: ${part.replayed} records replayed from checkpoint ${part.checkpoint} to the committed offset ${part.offset}`);
    return true;
  }

  async #loadStreams(keys: PartitionKeys, ids: readonly string[]): Promise<Map<string, StoredStream>> {
    const out = new Map<string, StoredStream>();
    if (ids.length === 0) return out;
    const [snapshots, quarantined] = await Promise.all([this.#client.hmgetBuffer(keys.snapshots, ...ids), this.#client.hmget(keys.quarantine, ...ids)]);
    ids.forEach((id, i) => out.set(id, { snapshot: snapshots[i] ?? null, quarantined: quarantined[i] ?? null }));
    return out;
  }
}

/** Entries ever added to a stream (XINFO STREAM entries-added, Redis 7), 0 when it does not exist. */
export async function entriesAdded(client: RedisClient, key: string): Promise<number> {
  try {
    const info = (await client.call("XINFO", "STREAM", key)) as unknown[];
    const at = info.indexOf("entries-added");
    return at < 0 ? 0 : Number(info[at + 1]);
  } catch (error) {
    if (error instanceof Error && /no such key/i.test(error.message)) return 0;
    throw error;
  }
}
