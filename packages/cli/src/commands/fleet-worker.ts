import { FleetWorker, SiteEvidence, type WorkerProgress } from "@leeway/fleet";
import { numberFlag, stringFlag, type CommandSpec, type ParsedArguments } from "../args.js";
import { buildEngine, defaultConfig, parseConfig } from "../config.js";
import { EXIT_OK, UsageError } from "../exit-codes.js";
import { readTextFile, type CliStreams } from "../io.js";
import type { RedisClient } from "@leeway/fleet";
import { closeFleet, connectFleet, FLEET_FLAGS, fleetFlags } from "./fleet-connection.js";

/** Arguments, flags and help of `leeway fleet worker`. */
export const fleetWorkerSpec: CommandSpec = {
  name: "fleet worker",
  summary: "Runs one worker of a fleet: takes its share of the partitions, decides every record of their input streams with one engine per stream, and commits each batch atomically.",
  positionals: [],
  flags: [
    ...FLEET_FLAGS,
    { name: "config", kind: "string", value: "FILE", description: "pipeline config (JSON); its engine options are every stream's (see docs/cli.md)" },
    { name: "inputs", kind: "number", value: "N", description: "feature mode: N features per record (default: score-only mode)" },
    { name: "only", kind: "string", value: "LIST", description: "comma-separated partitions this worker may own (default all)" },
    { name: "batch", kind: "number", value: "N", description: "records read and committed per partition per batch", defaultText: "1000" },
    { name: "checkpoint-every", kind: "number", value: "N", description: "batches per checkpoint (the snapshots of changed engines are stored once per checkpoint; a new owner replays up to N batches)", defaultText: "20" },
    { name: "lease-ms", kind: "number", value: "MS", description: "lease time to live: how long a dead worker's partitions wait", defaultText: "10000" },
    { name: "site-evidence", kind: "boolean", description: "also run the fleet's site-evidence consumer when this worker holds its lease (one runs per fleet)" },
    { name: "site-fraction", kind: "number", value: "F", description: "fraction of a site's streams whose onsets make a site-wide shift", defaultText: "0.5" },
    { name: "site-window", kind: "number", value: "N", description: "window the onsets must meet in (record time t, else samples)", defaultText: "900" },
  ],
  details: [
    "Progress (partitions, decisions, dead letters, lag) goes to stderr after every lease round. SIGINT or SIGTERM stops the worker gracefully: the batch in hand is committed and the leases are released. A worker killed any other way loses nothing: its partitions are taken over when their leases expire and continue from the last commit. See docs/fleet.md.",
  ],
  examples: ["leeway fleet worker --partitions 16 --config pipeline.json", "leeway fleet worker --redis redis://10.0.0.5:7000 --cluster --partitions 64 --batch 2000"],
};

function onlyFlag(parsed: ParsedArguments): number[] | undefined {
  const text = stringFlag(parsed, "only");
  if (text === undefined) return undefined;
  const list = text.split(",").map((s) => Number(s.trim()));
  if (list.some((n) => !Number.isInteger(n) || n < 0)) throw new UsageError(`fleet worker: flag --only must list partition numbers like 0,1,5, got ${JSON.stringify(text)}`);
  return list;
}

function progressLine(p: WorkerProgress): string {
  return `fleet worker ${p.owner}: partitions ${p.partitions.length === 0 ? "none" : p.partitions.join(",")} · ${p.decisions} decisions · ${p.deadLetters} dead letters · lag ${p.lag}\n`;
}

/** The site-evidence consumer's loop beside the worker: a round every lease/3 until stopped. */
function siteEvidence(parsed: ParsedArguments, client: RedisClient, fleet: { prefix: string; partitions: number }, owner: string, leaseMs: number | undefined): { stop(): void; done: Promise<void> } {
  const fraction = numberFlag(parsed, "site-fraction");
  const window = numberFlag(parsed, "site-window");
  const evidence = new SiteEvidence(client, {
    prefix: fleet.prefix,
    partitions: fleet.partitions,
    owner: `${owner}:sites`,
    ...(leaseMs === undefined ? {} : { leaseMs }),
    ...(fraction === undefined ? {} : { fraction }),
    ...(window === undefined ? {} : { window }),
  });
  let stopped = false;
  let wake: (() => void) | null = null;
  const done = (async () => {
    while (!stopped) {
      await evidence.round().catch(() => []);
      await new Promise<void>((resolve) => {
        wake = resolve;
        setTimeout(resolve, Math.floor((leaseMs ?? 10_000) / 3));
      });
    }
  })();
  return {
    stop: () => {
      stopped = true;
      wake?.();
    },
    done,
  };
}

/** leeway fleet worker. */
export async function runFleetWorker(parsed: ParsedArguments, io: CliStreams): Promise<number> {
  const fleet = fleetFlags(parsed, "fleet worker");
  const configPath = stringFlag(parsed, "config");
  const config = configPath === undefined ? defaultConfig() : parseConfig(await readTextFile(configPath, io), configPath);
  const inputs = numberFlag(parsed, "inputs") ?? null;
  buildEngine(config, inputs); // names a bad engine option by its place in the config file
  const engine = inputs === null ? { ...config.engine } : { ...config.engine, inputs };
  const only = onlyFlag(parsed);
  const batch = numberFlag(parsed, "batch");
  const checkpointEvery = numberFlag(parsed, "checkpoint-every");
  const leaseMs = numberFlag(parsed, "lease-ms");
  const client = connectFleet(fleet.url, fleet.cluster, "fleet worker");
  const worker = new FleetWorker(client, {
    prefix: fleet.prefix,
    partitions: fleet.partitions,
    engine,
    ...(only === undefined ? {} : { only }),
    ...(batch === undefined ? {} : { batch }),
    ...(checkpointEvery === undefined ? {} : { checkpointEvery }),
    ...(leaseMs === undefined ? {} : { leaseMs }),
  });
  worker.onProgress = (p) => io.stderr.write(progressLine(p));
  worker.onEvent = (e) => io.stderr.write(`fleet worker ${worker.owner}: ${e.message}\n`);
  const sites = parsed.flags.get("site-evidence") === true ? siteEvidence(parsed, client, fleet, worker.owner, leaseMs) : null;
  const stop = (): void => {
    worker.stop();
    sites?.stop();
  };
  process.once("SIGINT", stop);
  process.once("SIGTERM", stop);
  try {
    await Promise.all([worker.run(), sites?.done]);
  } finally {
    process.off("SIGINT", stop);
    process.off("SIGTERM", stop);
    await closeFleet(client);
  }
  io.stderr.write(`fleet worker ${worker.owner}: stopped\n`);
  return EXIT_OK;
}
