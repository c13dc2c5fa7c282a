import { resolve } from "node:path";
import { LeewayError } from "@leeway/core";
import { Timeline } from "@leeway/eval";
import { ModeRouter, ScriptedOperator, type Decision, type DecisionEngine } from "@leeway/policy";
import { numberFlag, stringFlag, type CommandSpec, type ParsedArguments } from "../args.js";
import { buildEngine, defaultConfig, parseConfig, type PipelineConfig } from "../config.js";
import { CliError, InputError, InterruptedError } from "../exit-codes.js";
import { openInput, PartialFile, prepareOutputFolder, readTextFile, TextSink, writeWholeFile, type CliStreams } from "../io.js";
import { logFormat, type LogForm } from "../log/compact-log.js";
import { readLines } from "../input/lines.js";
import { readSamples, type SampleBatch, type SampleRow, type StreamLayout } from "../input/samples.js";
import { ProgressBar } from "../progress.js";
import { renderReport } from "../report/html.js";
import { ReportCollector } from "../report/lanes.js";
import { countsText, metricsText, timelineText } from "../summary.js";
import { leewayVersion } from "../version.js";
import { labelsFromFlag, metricsOf } from "./report.js";

/** Arguments, flags and help of `leeway replay`. */
export const replaySpec: CommandSpec = {
  name: "replay",
  summary: "Replays a recorded stream of scores or feature vectors (CSV or NDJSON) through the decision engine and writes one decision per sample as NDJSON.",
  positionals: [{ name: "file", description: 'the stream: CSV with a header row, or NDJSON (one object per line); "-" reads standard input' }],
  flags: [
    { name: "config", kind: "string", value: "FILE", description: "pipeline config (JSON): input columns, engine options, report (see docs/cli.md)" },
    { name: "labels", kind: "string", value: "FILE", description: "labelled events (JSON) to measure the decisions against" },
    { name: "out", kind: "string", value: "DIR", description: "write the decision log and report.html into DIR instead of the decisions to stdout" },
    { name: "log", kind: "string", value: "FORM", description: "compact: one short row per sample, full decisions where the action, cause or phase changes (decisions.log); full: every decision with its whole evidence as NDJSON (decisions.ndjson)", defaultText: "compact", choices: ["compact", "full"] },
    { name: "sample-period", kind: "number", value: "SECONDS", description: "seconds between samples, for the report's time axis when the input has no time column" },
    { name: "force", kind: "boolean", description: "replace the output of an earlier run in the --out folder" },
  ],
  details: [
    "Columns: a single numeric column, or columns named score (or live) and ref… (at most two references: commissioning, newest), mean score-only mode (your model scores, leeway decides); otherwise every numeric column is a feature and leeway's own autoencoder pool scores them. A column named time, timestamp, datetime, date or t is carried through into the decisions; with input.modeColumn in the config, each value of that column (an operating mode) gets an engine of its own. Blank lines and lines starting with # are skipped.",
    "The input is streamed in constant memory. A malformed record stops the replay with exit code 3 and a message naming the file, line, column, field and value; decisions written until then are incomplete (with --out they stay in decisions.log.partial and no report is written). Outputs are written under .partial names and renamed only when the run succeeds; an --out folder that holds an earlier run is refused unless --force. SIGINT or SIGTERM stops the replay at the next batch with exit code 130 or 143, naming the partial file. With --labels the decisions are also kept compactly (19 bytes each) for the metrics.",
  ],
  examples: ["leeway replay ps2-scores.csv > decisions.log", "leeway replay ps2-scores.csv --log full > decisions.ndjson", "leeway replay spectra.ndjson --config pipeline.json --labels events.json --out run/", "cat scores.csv | leeway replay - | head"],
};

/** Per sample: one decision from the engine, in the mode the layout says. */
function decide(engine: DecisionEngine, layout: StreamLayout, row: SampleRow): Decision {
  if (layout.mode === "features") return engine.observe(row.values);
  const v = row.values;
  if (v.length === 1) return engine.observeScores(v[0] as number);
  return engine.observeScores(v[0] as number, references(v));
}

function references(v: Float64Array): number[] | undefined {
  return v.length === 1 ? undefined : v.length === 2 ? [v[1] as number] : [v[1] as number, v[2] as number];
}

/** One engine (with its scripted operator, if configured), or one per value of the mode column. */
function makeDecider(config: PipelineConfig, layout: StreamLayout): (row: SampleRow) => Decision {
  const inputs = layout.mode === "features" ? layout.featureColumns.length : null;
  const wantsOperator = config.operator.acknowledgeAfter !== null || config.operator.confirmAfter !== null;
  if (layout.modeColumn === null) {
    const engine = buildEngine(config, inputs);
    const operator = wantsOperator ? new ScriptedOperator(engine, config.operator) : null;
    return (row) => {
      const d = decide(engine, layout, row);
      operator?.after(d);
      return d;
    };
  }
  buildEngine(config, inputs); // the options are checked before the first record, not at its mode's first sample
  const router = new ModeRouter(() => buildEngine(config, inputs), wantsOperator ? config.operator : null);
  if (layout.mode === "features") return (row) => router.observe(row.values, row.mode as string);
  return (row) => router.observeScores(row.values[0] as number, references(row.values), row.mode as string);
}

function describeLayout(l: StreamLayout): string {
  const time = (l.timeColumn === null ? "no time column" : `time column ${l.timeColumn}`) + (l.modeColumn === null ? "" : `; one engine per value of ${l.modeColumn}`);
  const ignored = l.ignoredColumns.length === 0 ? "" : `; ignoring ${l.ignoredColumns.slice(0, 6).join(", ")}${l.ignoredColumns.length > 6 ? ", ..." : ""}`;
  if (l.mode === "scores") return `scores mode: live ${l.liveColumn as string}${l.referenceColumns.length > 0 ? `, references ${l.referenceColumns.join(", ")}` : ""}; ${time}${ignored}`;
  return `features mode: ${l.featureColumns.length} features (${l.featureColumns.slice(0, 3).join(", ")}${l.featureColumns.length > 3 ? ", ..." : ""}); ${time}${ignored}`;
}

/** Where a refused record's value is, for the message: the first non-finite value, or the live score. */
function refusedRecord(batch: SampleBatch, row: SampleRow, error: LeewayError): InputError {
  let j = 0;
  while (j < row.values.length && Number.isFinite(row.values[j] as number)) j++;
  const place = batch.place(row, j < row.values.length ? j : 0);
  const hint = error.code === "E_NON_FINITE" ? ' (engine.nonFinite: "skip" in the config skips such samples and counts them)' : "";
  return new InputError(`${place}: the engine refused this value: ${error.message} [${error.code}]${hint}`);
}

/** leeway replay. */
export async function runReplay(parsed: ParsedArguments, io: CliStreams): Promise<number> {
  const configPath = stringFlag(parsed, "config");
  const config: PipelineConfig = configPath === undefined ? defaultConfig() : parseConfig(await readTextFile(configPath, io), configPath);
  const labels = await labelsFromFlag(parsed, io);
  const outDir = stringFlag(parsed, "out");
  const format = logFormat((stringFlag(parsed, "log") ?? "compact") as LogForm);
  const input = await openInput(parsed.positionals[0] as string, io);
  if (outDir !== undefined) await prepareOutputFolder(resolve(io.cwd, outDir), ["decisions.log", "decisions.ndjson", "report.html"], parsed.flags.get("force") === true, "--force");
  const file = outDir === undefined ? null : await PartialFile.create(resolve(io.cwd, outDir, format.fileName));
  const sink = file === null ? new TextSink(io.stdout) : file.sink;
  const collector = outDir === undefined ? null : new ReportCollector({ columns: config.report.columns });
  const timeline = labels === null ? null : new Timeline();
  const progress = new ProgressBar(io.stderr, io.stderrIsTTY, input.size, "replay");
  let decider: ((row: SampleRow) => Decision) | null = null;
  let layout: StreamLayout | null = null;
  let samples = 0;
  let lastLine = 0;
  try {
    const lines = readLines(input.chunks, { name: input.name });
    const batches = readSamples(lines, {
      name: input.name,
      mode: config.input.mode,
      ...(config.input.time === undefined ? {} : { timeColumn: config.input.time }),
      ...(config.input.columns === undefined ? {} : { columns: config.input.columns }),
      ...(config.input.modeColumn === null ? {} : { modeColumn: config.input.modeColumn }),
    });
    for await (const batch of batches) {
      if (io.signal?.aborted === true) throw new InterruptedError(String(io.signal.reason), `replay interrupted by ${String(io.signal.reason)}`);
      if (decider === null) {
        layout = batch.layout;
        if (layout.mode === "scores" && layout.referenceColumns.length > 2) {
          throw new InputError(`${input.name}: at most two reference columns (commissioning, newest) are read; got ${layout.referenceColumns.join(", ")}`);
        }
        io.stderr.write(`replay: ${describeLayout(layout)}\n`);
        decider = makeDecider(config, layout);
        const header = format.header();
        if (header !== null) sink.write(header + "\n");
      }
      for (const row of batch.rows) {
        let decision: Decision;
        try {
          decision = decider(row);
        } catch (error) {
          if (error instanceof LeewayError) throw refusedRecord(batch, row, error);
          throw error;
        }
        lastLine = row.line;
        const pending = sink.write(format.line(decision, row.time) + "\n");
        if (pending !== undefined) await pending;
        collector?.add(decision, row.time);
        timeline?.record(decision);
        samples++;
      }
      progress.update(batch.bytesRead, samples);
    }
    const end = format.end(samples);
    if (end !== null) sink.write(end + "\n");
    await sink.flush();
  } catch (error) {
    progress.done();
    await sink.flush().catch(() => undefined);
    const stopped = error instanceof InterruptedError ? error.message : error instanceof CliError ? `${error.message}\nreplay stopped` : null;
    if (stopped !== null) {
      const where = file === null ? "the decisions written are incomplete" : `they are in ${file.partialPath}, which is incomplete`;
      if (file !== null) await file.abandon();
      const text = `${stopped} after ${samples} decisions (last good line ${lastLine}); ${where}`;
      throw error instanceof InterruptedError ? new InterruptedError(error.signal, text) : new InputError(text);
    }
    if (file !== null) await file.abandon();
    throw error;
  }
  progress.done();
  const metrics = timeline !== null && labels !== null ? metricsOf(timeline, labels, stringFlag(parsed, "labels") as string) : null;
  if (file !== null && collector !== null) {
    const data = collector.result();
    const drawn = data.all;
    const reportPath = resolve(io.cwd, outDir as string, "report.html");
    await writeWholeFile(
      reportPath,
      renderReport({
        title: config.report.title,
        subtitle: `Replay of ${input.name} (${describeLayout(layout as StreamLayout)}).`,
        timeline: drawn,
        lanes: data.lanes,
        samplePeriod: numberFlag(parsed, "sample-period") ?? null,
        ...(labels === null ? {} : { events: labels.events }),
        ...(metrics === null ? {} : { metrics }),
        facts: [["input", input.name], ["config", configPath ?? "defaults"], ["labels", stringFlag(parsed, "labels") ?? "none"]],
        version: leewayVersion(),
      }),
    );
    await file.commit();
    io.stdout.write(`replayed ${samples} samples: ${countsText(drawn)}\n\ndecision changes:\n${timelineText(drawn)}\n`);
    if (metrics !== null) io.stdout.write(`\nmetrics against ${stringFlag(parsed, "labels") as string}:\n${metricsText(metrics)}\n`);
    io.stdout.write(`\nwrote ${file.path}\nwrote ${reportPath}\n`);
  } else {
    io.stderr.write(`replay: ${samples} decisions written\n`);
    if (metrics !== null) io.stderr.write(`metrics against ${stringFlag(parsed, "labels") as string}:\n${metricsText(metrics)}\n`);
  }
  return 0;
}
