import { helpText, parseArguments, type CommandSpec } from "../args.js";
import { EXIT_OK, EXIT_USAGE } from "../exit-codes.js";
import type { CliStreams } from "../io.js";
import { suggestion } from "../nearest.js";
import { fleetFeedSpec, runFleetFeed } from "./fleet-feed.js";
import { fleetStatusSpec, runFleetStatus } from "./fleet-status.js";
import { fleetWorkerSpec, runFleetWorker } from "./fleet-worker.js";

const ACTIONS = [
  { name: "worker", spec: fleetWorkerSpec, run: runFleetWorker },
  { name: "feed", spec: fleetFeedSpec, run: runFleetFeed },
  { name: "status", spec: fleetStatusSpec, run: runFleetStatus },
] as const;

/** The `fleet` entry of `leeway --help` (its actions have their own specs). */
export const fleetSpec: CommandSpec = {
  name: "fleet",
  summary: "Runs one engine per stream across worker processes on Redis Streams: worker, feed, status.",
  positionals: [{ name: "action", description: "worker, feed or status" }],
  flags: [],
};

function fleetHelp(): string {
  return [
    "leeway fleet <action> [arguments] [flags]",
    "",
    fleetSpec.summary,
    "",
    "Actions:",
    ...ACTIONS.map((a) => `  ${a.name.padEnd(8)} ${a.spec.summary}`),
    "",
    "leeway fleet <action> --help for an action's flags; docs/fleet.md for the architecture and failure semantics.",
  ].join("\n") + "\n";
}

/** leeway fleet <action> ...: dispatches to the action's own arguments. */
export async function runFleet(argv: readonly string[], io: CliStreams): Promise<number> {
  const [first, ...rest] = argv;
  if (first === undefined || first === "-h" || first === "--help") {
    io.stdout.write(fleetHelp());
    return first === undefined ? EXIT_USAGE : EXIT_OK;
  }
  const action = ACTIONS.find((a) => a.name === first);
  if (action === undefined) {
    io.stderr.write(`leeway: fleet: unknown action ${JSON.stringify(first)}${suggestion(first, ACTIONS.map((a) => a.name))} (actions: worker, feed, status)\n`);
    return EXIT_USAGE;
  }
  const parsed = parseArguments(action.spec, rest);
  if (parsed.help) {
    io.stdout.write(helpText(action.spec));
    return EXIT_OK;
  }
  return await action.run(parsed, io);
}
