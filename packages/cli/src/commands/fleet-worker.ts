import { FleetWorker, type WorkerProgress } from "@leeway/fleet";
import { numberFlag, stringFlag, type CommandSpec, type ParsedArguments } from "../args.js";
import { buildEngine, defaultConfig, parseConfig } from "../config.js";
import { EXIT_OK, UsageError } from "../exit-codes.js";
import { readTextFile, type CliStreams } from "../io.js";
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
    { name: "lease-ms", kind: "number", value: "MS", description: "lease time to live: how long a dead worker's partitions wait", defaultText: "10000" },
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
  const leaseMs = numberFlag(parsed, "lease-ms");
  const client = connectFleet(fleet.url, fleet.cluster, "fleet worker");
  const worker = new FleetWorker(client, {
    prefix: fleet.prefix,
    partitions: fleet.partitions,
    engine,
    ...(only === undefined ? {} : { only }),
    ...(batch === undefined ? {} : { batch }),
    ...(leaseMs === undefined ? {} : { leaseMs }),
  });
  worker.onProgress = (p) => io.stderr.write(progressLine(p));
  worker.onEvent = (e) => io.stderr.write(`fleet worker ${worker.owner}: ${e.message}\n`);
  const stop = (): void => worker.stop();
  process.once("SIGINT", stop);
  process.once("SIGTERM", stop);
  try {
    await worker.run();
  } finally {
    process.off("SIGINT", stop);
    process.off("SIGTERM", stop);
    await closeFleet(client);
  }
  io.stderr.write(`fleet worker ${worker.owner}: stopped\n`);
  return EXIT_OK;
}
