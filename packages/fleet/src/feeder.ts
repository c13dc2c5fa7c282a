import { integerInRange, optionsObject } from "@leeway/core";
import { checkPrefix, partitionKeys, partitionOf } from "./keys.js";
import { operatorFields, sampleFields, type OperatorEvent } from "./records.js";
import type { RedisClient } from "./scripts.js";

/** Options of {@link FleetFeeder}. */
export interface FleetFeederOptions {
  /** Key prefix of the fleet. Default "leeway". */
  prefix?: string;
  /** Number of partitions of the fleet (the workers' number), 1 to 65536. */
  partitions: number;
}

/**
 * Publishes samples and operator events into the input streams of a fleet:
 * each record goes to its stream id's partition ({@link partitionOf}), in
 * the order given (one stream's records never overtake each other).
 * @example
 * const feeder = new FleetFeeder(redis, { partitions: 16 });
 * feeder.sample("ps2-de", "harbour-lane", [0.82]);
 * feeder.operator("ps2-de", "harbour-lane", "acknowledge");
 * await feeder.flush(); // 2
 */
export class FleetFeeder {
  readonly #client: RedisClient;
  readonly #prefix: string;
  readonly #partitions: number;
  #queued: [key: string, fields: string[]][] = [];

  constructor(client: RedisClient, options: FleetFeederOptions) {
    const o = optionsObject<FleetFeederOptions>("FleetFeeder", options, ["prefix", "partitions"]);
    this.#client = client;
    this.#prefix = checkPrefix("FleetFeeder", o.prefix ?? "leeway");
    this.#partitions = integerInRange("FleetFeeder", "partitions", o.partitions, 1, 1 << 16);
  }

  /** Records queued and not yet flushed. */
  get queued(): number {
    return this.#queued.length;
  }

  /** Queues a sample (score-only: `[live]`, `[live, commissioning]` or `[live, commissioning, newest]`; feature mode: the features). */
  sample(stream: string, site: string, values: ArrayLike<number>, time?: number): void {
    this.raw(stream, sampleFields(stream, site, values, time));
  }

  /** Queues an operator event for one stream's engine. */
  operator(stream: string, site: string, event: OperatorEvent, length?: number): void {
    this.raw(stream, operatorFields(stream, site, event, length));
  }

  /** Queues a record given as fields (also malformed ones: the workers dead-letter those). */
  raw(stream: string, fields: string[]): void {
    this.#queued.push([partitionKeys(this.#prefix, partitionOf(stream, this.#partitions)).input, fields]);
  }

  /** Writes the queued records (XADD, pipelined per connection) and returns how many. */
  async flush(): Promise<number> {
    const queued = this.#queued;
    this.#queued = [];
    if (this.#client.isCluster) {
      // ioredis groups these per node when the client has enableAutoPipelining; order per connection is kept.
      await Promise.all(queued.map(([key, fields]) => this.#client.xadd(key, "*", ...fields)));
      return queued.length;
    }
    for (let start = 0; start < queued.length; start += 1000) {
      const pipeline = this.#client.pipeline();
      for (const [key, fields] of queued.slice(start, start + 1000)) pipeline.xadd(key, "*", ...fields);
      const replies = (await pipeline.exec()) ?? [];
      const failed = replies.find(([error]) => error !== null);
      if (failed !== undefined) throw failed[0] as Error;
    }
    return queued.length;
  }
}
