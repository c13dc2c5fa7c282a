import { fleetStatus, type FleetStatus } from "@leeway/fleet";
import type { CommandSpec, ParsedArguments } from "../args.js";
import { EXIT_OK } from "../exit-codes.js";
import type { CliStreams } from "../io.js";
import { closeFleet, connectFleet, FLEET_FLAGS, fleetFlags } from "./fleet-connection.js";

/** Arguments, flags and help of `leeway fleet status`. */
export const fleetStatusSpec: CommandSpec = {
  name: "fleet status",
  summary: "Shows a fleet: each partition's owner, fencing token, lag and dead letters; the live workers; the open alarms per site.",
  positionals: [],
  flags: [...FLEET_FLAGS, { name: "json", kind: "boolean", description: "print the status as one JSON object" }],
  examples: ["leeway fleet status --partitions 16", "leeway fleet status --partitions 16 --json | jq .totalLag"],
};

/** The status as a text table. */
export function statusText(s: FleetStatus): string {
  const lines = [`workers: ${s.workers.length === 0 ? "none live" : s.workers.join(", ")}`, `total lag: ${s.totalLag}`, "", "partition  owner                                  token  lag       dead  alarms"];
  for (const p of s.partitions) {
    lines.push(`${String(p.partition).padStart(9)}  ${(p.owner ?? "-").padEnd(38)} ${String(p.token).padStart(5)}  ${String(p.lag).padEnd(8)}  ${String(p.deadLetters).padStart(4)}  ${p.openAlarms}${p.quarantined > 0 ? ` (${p.quarantined} quarantined)` : ""}`);
  }
  const sites = Object.entries(s.alarmsBySite).sort(([a], [b]) => a.localeCompare(b));
  lines.push("", sites.length === 0 ? "open alarms: none" : "open alarms per site:");
  for (const [site, streams] of sites) lines.push(`  ${site === "" ? "(no site)" : site}: ${streams.length} — ${streams.slice(0, 8).join(", ")}${streams.length > 8 ? ", ..." : ""}`);
  return lines.join("\n") + "\n";
}

/** leeway fleet status. */
export async function runFleetStatus(parsed: ParsedArguments, io: CliStreams): Promise<number> {
  const fleet = fleetFlags(parsed, "fleet status");
  const client = connectFleet(fleet.url, fleet.cluster, "fleet status");
  try {
    const status = await fleetStatus(client, { prefix: fleet.prefix, partitions: fleet.partitions });
    io.stdout.write(parsed.flags.get("json") === true ? `${JSON.stringify(status)}\n` : statusText(status));
  } finally {
    await closeFleet(client);
  }
  return EXIT_OK;
}
