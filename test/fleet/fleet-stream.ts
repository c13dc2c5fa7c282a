import { spawn, type ChildProcess } from "node:child_process";
import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { RandomSource } from "@leeway/core";
import { DecisionEngine, type DecisionEngineOptions } from "@leeway/policy";
import { compareIds, FleetFeeder, partitionKeys, type RedisClient } from "@leeway/fleet";

/** Small engine settings so that a few hundred samples per stream see commissioning, calibration, drifts and alarms. */
export const SMALL_ENGINE: DecisionEngineOptions = {
  commissioning: 60,
  calibration: 60,
  calibrationReplicates: 10,
  targetArl0: 300,
  settling: 40,
  settlingLimit: 200,
  trendBlock: 5,
  trendWindow: 30,
  trendMinBlocks: 10,
  baselineHalfLife: 100,
  coolDown: 50,
  retrainHorizon: 2000,
  seed: 7,
};

/** One record of the recorded fleet stream, in feed order. */
export interface FleetRecord {
  stream: string;
  site: string;
  /** The record's fields as published (malformed ones included). */
  fields: string[];
  /** The sample, or null for a malformed record (expected in the dead letters). */
  values: number[] | null;
}

/**
 * A recorded fleet stream (invented, Harbour Lane style): `streams` score
 * streams over three sites, interleaved sample by sample; a third of them
 * shift their level once, a sixth ramp up, every fifth carries its
 * commissioning reference's score; `malformed` bad records are mixed in.
 */
export function recordedFleet(streams: number, samples: number, seed: number, malformed = 0): FleetRecord[] {
  const rng = new RandomSource(seed);
  const out: FleetRecord[] = [];
  const sites = ["harbour-lane", "quay-street", "mill-race"];
  const shiftAt = Array.from({ length: streams }, (_, s) => (s % 3 === 0 ? 150 + rng.integer(samples - 200) : -1));
  for (let i = 0; i < samples; i++) {
    for (let s = 0; s < streams; s++) {
      const stream = `ps${s}-de`;
      const site = sites[s % 3] as string;
      let level = 1 + 0.1 * s;
      if (shiftAt[s] as number >= 0 && i >= (shiftAt[s] as number)) level *= 1.8;
      if (s % 6 === 1 && i > samples / 3) level *= 1 + (1.5 * (i - samples / 3)) / samples;
      const live = level * Math.exp(0.15 * rng.normal());
      const values = s % 5 === 0 ? [live, level * Math.exp(0.15 * rng.normal())] : [live];
      out.push({ stream, site, values, fields: ["s", stream, "g", site, "v", values.map(String).join(",")] });
    }
  }
  const reasons = [["v", "0.9,abc"], ["v", "1,2,3,4,5"], ["v", "NaN"], ["op", "explode"], ["v", ""]];
  for (let k = 0; k < malformed; k++) {
    const at = 1 + rng.integer(out.length - 1);
    const stream = `ps${rng.integer(streams)}-de`;
    const [field, value] = reasons[k % reasons.length] as [string, string];
    out.splice(at, 0, { stream, site: "harbour-lane", values: null, fields: ["s", stream, "g", "harbour-lane", field, value] });
  }
  return out;
}

/** The in-process replay: one engine per stream, records in feed order; decision JSON per stream. */
export function replayInProcess(records: readonly FleetRecord[], options: DecisionEngineOptions): Map<string, string[]> {
  const engines = new Map<string, DecisionEngine>();
  const out = new Map<string, string[]>();
  for (const r of records) {
    if (r.values === null) continue;
    let engine = engines.get(r.stream);
    if (engine === undefined) {
      engine = new DecisionEngine(options);
      engines.set(r.stream, engine);
      out.set(r.stream, []);
    }
    const d = r.values.length === 1 ? engine.observeScores(r.values[0] as number) : engine.observeScores(r.values[0] as number, r.values.slice(1));
    (out.get(r.stream) as string[]).push(JSON.stringify(d));
  }
  return out;
}

/** Publishes the records through a FleetFeeder. */
export async function feed(client: RedisClient, records: readonly FleetRecord[], partitions: number, prefix = "leeway"): Promise<void> {
  const feeder = new FleetFeeder(client, { partitions, prefix });
  for (const r of records) feeder.raw(r.stream, r.fields);
  await feeder.flush();
}

/** What the fleet wrote: decision JSON per stream (in input order), every input id decided, the dead letters. */
export interface FleetOutput {
  decisions: Map<string, string[]>;
  decidedInputs: string[];
  dead: { stream: string; reason: string; input: string }[];
}

function fieldsOf(list: string[]): Map<string, string> {
  const m = new Map<string, string>();
  for (let i = 0; i + 1 < list.length; i += 2) m.set(list[i] as string, list[i + 1] as string);
  return m;
}

/** Reads every partition's output and dead-letter streams. */
export async function readOutput(client: RedisClient, partitions: number, prefix = "leeway"): Promise<FleetOutput> {
  const decisions = new Map<string, string[]>();
  const decidedInputs: string[] = [];
  const dead: FleetOutput["dead"] = [];
  for (let p = 0; p < partitions; p++) {
    const keys = partitionKeys(prefix, p);
    const entries = (await client.xrange(keys.output, "-", "+")) as [string, string[]][];
    const decided = entries.map(([, f]) => fieldsOf(f)).filter((f) => f.has("d"));
    decided.sort((a, b) => compareIds(a.get("in") as string, b.get("in") as string));
    for (const f of decided) {
      const stream = f.get("s") as string;
      if (!decisions.has(stream)) decisions.set(stream, []);
      (decisions.get(stream) as string[]).push(f.get("d") as string);
      decidedInputs.push(`${p}/${f.get("in") as string}`);
    }
    for (const [, list] of (await client.xrange(keys.dead, "-", "+")) as [string, string[]][]) {
      const f = fieldsOf(list);
      dead.push({ stream: f.get("s") as string, reason: f.get("reason") as string, input: f.get("in") as string });
    }
  }
  return { decisions, decidedInputs, dead };
}

const BIN = fileURLToPath(new URL("../../packages/cli/bin/leeway.js", import.meta.url));

/** A `leeway fleet worker` child process (its stderr kept for the assertions). */
export interface WorkerProcess {
  child: ChildProcess;
  log: string[];
  exited: Promise<number | null>;
}

/** Writes the engine options as a pipeline config file in `dir`. */
export function writeConfig(dir: string, engine: DecisionEngineOptions): string {
  const path = join(dir, "pipeline.json");
  writeFileSync(path, JSON.stringify({ engine }));
  return path;
}

/** Starts `leeway fleet worker` (the built command) with the given flags. */
export function startWorker(flags: string[]): WorkerProcess {
  const child = spawn(process.execPath, [BIN, "fleet", "worker", ...flags], { stdio: ["ignore", "ignore", "pipe"] });
  const log: string[] = [];
  child.stderr?.setEncoding("utf8");
  child.stderr?.on("data", (chunk: string) => log.push(chunk));
  const exited = new Promise<number | null>((resolve) => child.once("exit", (code) => resolve(code)));
  return { child, log, exited };
}

/** Committed input entries over all partitions. */
export async function consumed(client: RedisClient, partitions: number, prefix = "leeway"): Promise<number> {
  let total = 0;
  for (let p = 0; p < partitions; p++) total += Number((await client.hget(partitionKeys(prefix, p).meta, "consumed")) ?? 0);
  return total;
}

/** Polls until `check` is true (every 100 ms, at most `ms`). */
export async function waitFor(check: () => Promise<boolean>, ms: number, what: string): Promise<void> {
  const until = Date.now() + ms;
  while (Date.now() < until) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`timed out after ${ms} ms waiting for ${what}`);
}
