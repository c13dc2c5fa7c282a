import { FleetFeeder } from "@leeway/fleet";
import { stringFlag, type CommandSpec, type ParsedArguments } from "../args.js";
import { EXIT_OK, InputError } from "../exit-codes.js";
import { openInput, type CliStreams } from "../io.js";
import { readLines } from "../input/lines.js";
import { readSamples } from "../input/samples.js";
import { ProgressBar } from "../progress.js";
import { closeFleet, connectFleet, FLEET_FLAGS, fleetFlags } from "./fleet-connection.js";

/** Arguments, flags and help of `leeway fleet feed`. */
export const fleetFeedSpec: CommandSpec = {
  name: "fleet feed",
  summary: "Publishes a recorded stream (CSV or NDJSON, many sensors interleaved) into a fleet's input streams, each record to its stream id's partition, in file order.",
  positionals: [{ name: "file", description: 'the recording; a column names each record\'s stream id; "-" reads standard input' }],
  flags: [
    ...FLEET_FLAGS,
    { name: "stream-column", kind: "string", value: "NAME", description: "the column holding the stream id", defaultText: "stream" },
    { name: "site", kind: "string", value: "NAME", description: "site of every record (default: the part of the stream id before its first /, or none)" },
  ],
  details: [
    "The other columns are read as leeway replay reads them: a single numeric column, or score (or live) and ref… columns, mean score-only mode; otherwise every numeric column is a feature. A time column is carried into the decisions. A malformed line stops the feed with exit code 3; the records before it are published.",
  ],
  examples: ["leeway fleet feed --partitions 16 harbour-lane.csv", "leeway fleet feed --partitions 16 --site harbour-lane - < pumps.ndjson"],
};

/** leeway fleet feed. */
export async function runFleetFeed(parsed: ParsedArguments, io: CliStreams): Promise<number> {
  const fleet = fleetFlags(parsed, "fleet feed");
  const streamColumn = stringFlag(parsed, "stream-column") ?? "stream";
  const fixedSite = stringFlag(parsed, "site");
  const input = await openInput(parsed.positionals[0] as string, io);
  const client = connectFleet(fleet.url, fleet.cluster, "fleet feed");
  const feeder = new FleetFeeder(client, { prefix: fleet.prefix, partitions: fleet.partitions });
  const progress = new ProgressBar(io.stderr, io.stderrIsTTY, input.size, "fleet feed");
  let published = 0;
  try {
    for await (const batch of readSamples(readLines(input.chunks, { name: input.name }), { name: input.name, modeColumn: streamColumn })) {
      for (const row of batch.rows) {
        const stream = row.mode;
        if (stream === null || stream.length === 0) throw new InputError(`${input.name}:${row.line}: the stream column ${streamColumn} is empty; expected a stream id`);
        const slash = stream.indexOf("/");
        const site = fixedSite ?? (slash > 0 ? stream.slice(0, slash) : "");
        const time = typeof row.time === "number" ? row.time : typeof row.time === "string" && row.time.trim() !== "" && Number.isFinite(Number(row.time)) ? Number(row.time) : undefined;
        feeder.sample(stream, site, row.values, time);
      }
      if (feeder.queued >= 5000) published += await feeder.flush();
      progress.update(batch.bytesRead, published + feeder.queued);
    }
  } finally {
    published += await feeder.flush().catch(() => 0);
    await closeFleet(client);
    progress.done();
  }
  io.stderr.write(`fleet feed: ${published} records published into ${fleet.partitions} partitions\n`);
  return EXIT_OK;
}
