import { integerInRange, optionsObject } from "@leeway/core";
import type { Decision } from "@leeway/policy";
import { FleetFeeder } from "./feeder.js";
import { checkPrefix, fleetKeys, partitionKeys } from "./keys.js";
import { acquireLease } from "./lease.js";
import type { StreamEntry } from "./partition.js";
import type { RedisClient } from "./scripts.js";
import { SiteOnsets, type SiteOnsetsOptions } from "./site-onsets.js";

/** Options of {@link SiteEvidence}. */
export interface SiteEvidenceOptions extends SiteOnsetsOptions {
  /** Key prefix of the fleet. Default "leeway". */
  prefix?: string;
  /** Number of partitions of the fleet. */
  partitions: number;
  /** Lease time to live, in milliseconds (one consumer runs per fleet). Default 10000. */
  leaseMs?: number;
  /** Output entries read per partition per round. Default 1000. */
  batch?: number;
  /** Owner name of its lease. */
  owner: string;
}

/**
 * A decision that starts a change episode: its change test fired, or it
 * raised an alarm. A degradation (a machine's own slow trend) and the
 * reminder of an alarm already raised are no onsets: a degrading machine is
 * never counted into, nor told of, a site-wide shift.
 */
export function isOnset(decision: Pick<Decision, "action" | "cause" | "evidence">): boolean {
  if (decision.cause === "degradation" || decision.evidence.reminder !== undefined) return false;
  const change = decision.evidence.change as { status?: unknown } | undefined;
  return change?.status === "change" || decision.action === "alarm";
}

/**
 * The consumer of the decision streams that gathers each site's change
 * onsets ({@link SiteOnsets}) and, on a site-wide shift, publishes a
 * `site-shift` operator event into each affected stream's input, so its
 * engine absorbs the shift as concept drift without paging. One runs per
 * fleet (it holds a lease); its read positions are stored after the events
 * are published (at least once: a restart may publish an event again, which
 * the engine takes as the same news).
 * @example
 * const evidence = new SiteEvidence(redis, { partitions: 16, owner: "sites-1", fraction: 0.5, window: 900 });
 * await evidence.round(); // reads new decisions, returns the events it published
 */
export class SiteEvidence {
  readonly #client: RedisClient;
  readonly #prefix: string;
  readonly #partitions: number;
  readonly #leaseMs: number;
  readonly #batch: number;
  readonly #owner: string;
  readonly #onsets: SiteOnsets;
  readonly #cursors: string[];
  #token: string | null = null;
  #loaded = false;

  constructor(client: RedisClient, options: SiteEvidenceOptions) {
    const o = optionsObject<SiteEvidenceOptions>("SiteEvidence", options, ["prefix", "partitions", "leaseMs", "batch", "owner", "fraction", "window", "minStreams"]);
    this.#client = client;
    this.#prefix = checkPrefix("SiteEvidence", o.prefix ?? "leeway");
    this.#partitions = integerInRange("SiteEvidence", "partitions", o.partitions, 1, 1 << 16);
    this.#leaseMs = integerInRange("SiteEvidence", "leaseMs", o.leaseMs ?? 10_000, 200, 600_000);
    this.#batch = integerInRange("SiteEvidence", "batch", o.batch ?? 1000, 1, 100_000);
    this.#owner = String(o.owner);
    const onsetOptions: SiteOnsetsOptions = {};
    if (o.fraction !== undefined) onsetOptions.fraction = o.fraction;
    if (o.window !== undefined) onsetOptions.window = o.window;
    if (o.minStreams !== undefined) onsetOptions.minStreams = o.minStreams;
    this.#onsets = new SiteOnsets(onsetOptions);
    this.#cursors = new Array<string>(this.#partitions).fill("0-0");
  }

  /** True while this consumer holds the fleet's site-evidence lease. */
  get active(): boolean {
    return this.#token !== null;
  }

  /**
   * Takes or renews the lease; when held, reads the new output entries of
   * every partition and publishes the site-shift events they call for.
   * Returns the events published as `site/stream`.
   */
  async round(): Promise<string[]> {
    const keys = fleetKeys(this.#prefix);
    const lease = await acquireLease(this.#client, { meta: keys.siteMeta, lease: keys.siteLease }, this.#owner, this.#leaseMs);
    if (lease === null) {
      this.#token = null;
      return [];
    }
    this.#token = lease.token;
    if (!this.#loaded) {
      const stored = await this.#client.hgetall(keys.siteCursors);
      for (let p = 0; p < this.#partitions; p++) this.#cursors[p] = stored[String(p)] ?? "0-0";
      this.#loaded = true;
    }
    const feeder = new FleetFeeder(this.#client, { prefix: this.#prefix, partitions: this.#partitions });
    const told: string[] = [];
    const moved: string[] = [];
    for (let p = 0; p < this.#partitions; p++) {
      const entries = (await this.#client.xrange(partitionKeys(this.#prefix, p).output, `(${this.#cursors[p] as string}`, "+", "COUNT", this.#batch)) as StreamEntry[];
      for (const [, fields] of entries) {
        const f = new Map<string, string>();
        for (let i = 0; i + 1 < fields.length; i += 2) f.set(fields[i] as string, fields[i + 1] as string);
        const text = f.get("d");
        if (text === undefined) continue;
        const decision = JSON.parse(text) as Decision;
        const stream = f.get("s") as string;
        const site = f.get("g") ?? "";
        const time = f.has("t") ? Number(f.get("t")) : decision.index;
        for (const target of this.#onsets.observe(stream, site, time, isOnset(decision), decision.cause === "degradation")) {
          feeder.operator(target, site, "site-shift");
          told.push(`${site}/${target}`);
        }
      }
      if (entries.length > 0) {
        this.#cursors[p] = (entries[entries.length - 1] as StreamEntry)[0];
        moved.push(String(p), this.#cursors[p] as string);
      }
    }
    await feeder.flush();
    if (moved.length > 0) await this.#client.hset(keys.siteCursors, ...moved);
    return told;
  }
}
