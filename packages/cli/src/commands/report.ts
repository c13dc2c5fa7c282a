import { dirname, resolve } from "node:path";
import { evaluate, Timeline } from "@leeway/eval";
import { numberFlag, stringFlag, type CommandSpec, type ParsedArguments } from "../args.js";
import { readDecisionLog, type DecisionLogInfo } from "../decision-log.js";
import { InputError, InterruptedError } from "../exit-codes.js";
import { openInput, readTextFile, writeWholeFile, type CliStreams } from "../io.js";
import { readLines } from "../input/lines.js";
import { parseLabels, type LabelsFile } from "../labels-file.js";
import { ProgressBar } from "../progress.js";
import { renderReport } from "../report/html.js";
import { ReportCollector } from "../report/lanes.js";
import { leewayVersion } from "../version.js";

/** Arguments, flags and help of `leeway report`. */
export const reportSpec: CommandSpec = {
  name: "report",
  summary: "Rebuilds the HTML report from a decision log (compact or full, as replay and demo write it).",
  positionals: [{ name: "decisions", description: 'the decision log (decisions.log or decisions.ndjson), or "-" for standard input' }],
  flags: [
    { name: "labels", kind: "string", value: "FILE", description: "labelled events (JSON) to draw and to measure the decisions against" },
    { name: "out", kind: "string", value: "FILE", description: "where to write the report", defaultText: "report.html beside the decision log" },
    { name: "sample-period", kind: "number", value: "SECONDS", description: "seconds between samples, for the time axis when the log has no times" },
    { name: "title", kind: "string", value: "TEXT", description: "heading of the report", defaultText: '"leeway report"' },
  ],
  details: [
    "The report is one self-contained HTML file (inline SVG, no script, nothing fetched; it prints to A4): what needs attention at the end of the record, one lane per engine (scores and thresholds, change test, trend evidence) on a wall-clock time axis, decisions by cause, labelled events, a table of events and, with --labels, the metrics (detection delays, what the answers claimed against what happened, false alarms); the decisions are then also kept in memory, 19 bytes each, for the metrics. A .partial log, or a compact log without its closing line, gives a report marked incomplete.",
  ],
  examples: ["leeway report out/decisions.log --labels out/labels.json", "leeway replay scores.csv | leeway report - --out ps2.html"],
};

/** Reads a labels file given by --labels, or null. */
export async function labelsFromFlag(parsed: ParsedArguments, io: CliStreams): Promise<LabelsFile | null> {
  const path = stringFlag(parsed, "labels");
  if (path === undefined) return null;
  return parseLabels(await readTextFile(path, io), path);
}

/** Evaluates an eval Timeline against labels, turning the evaluator's option errors into input errors. */
export function metricsOf(timeline: Timeline, labels: LabelsFile, name: string): ReturnType<typeof evaluate> {
  try {
    return evaluate(timeline, labels.anomaly === null ? { events: labels.events } : { events: labels.events, anomaly: labels.anomaly });
  } catch (error) {
    if (error instanceof Error && "code" in error) throw new InputError(`${name}: ${error.message}`);
    throw error;
  }
}

/** leeway report: decision log → report.html. */
export async function runReport(parsed: ParsedArguments, io: CliStreams): Promise<number> {
  const path = parsed.positionals[0] as string;
  const labels = await labelsFromFlag(parsed, io);
  const input = await openInput(path, io);
  const collector = new ReportCollector();
  const timeline = labels === null ? null : new Timeline();
  const progress = new ProgressBar(io.stderr, io.stderrIsTTY, input.size, "report");
  let bytes = 0;
  const lines = (async function* () {
    for await (const batch of readLines(input.chunks, { name: input.name })) {
      bytes = batch.bytesRead;
      yield batch;
    }
  })();
  const info: DecisionLogInfo = { format: null, complete: null };
  for await (const batch of readDecisionLog(lines, input.name, info)) {
    if (io.signal?.aborted === true) {
      progress.done();
      throw new InterruptedError(String(io.signal.reason), `report interrupted by ${String(io.signal.reason)} after ${collector.count} decisions; no report written`);
    }
    for (const { decision, time } of batch) {
      collector.add(decision, time);
      timeline?.record(decision);
    }
    progress.update(bytes, collector.count);
  }
  progress.done();
  const incomplete = incompleteNote(path, info);
  const data = collector.result();
  if (incomplete !== null) io.stderr.write(`report: ${incomplete}\n`);
  const metrics = timeline !== null && labels !== null ? metricsOf(timeline, labels, stringFlag(parsed, "labels") as string) : undefined;
  const out = resolve(io.cwd, stringFlag(parsed, "out") ?? (path === "-" ? "report.html" : `${dirname(path)}/report.html`));
  const html = renderReport({
    title: stringFlag(parsed, "title") ?? "leeway report",
    subtitle: `Rebuilt from the decision log ${input.name}${labels === null ? "" : ` with the labels of ${stringFlag(parsed, "labels") as string}`}.`,
    timeline: data.all,
    lanes: data.lanes,
    samplePeriod: numberFlag(parsed, "sample-period") ?? null,
    ...(labels === null ? {} : { events: labels.events }),
    ...(metrics === undefined ? {} : { metrics }),
    ...(incomplete === null ? {} : { incomplete }),
    version: leewayVersion(),
  });
  await writeWholeFile(out, html);
  io.stdout.write(`wrote ${out} (${(Buffer.byteLength(html) / 1024).toFixed(0)} KiB, ${collector.count} decisions)\n`);
  return 0;
}

/** Why a decision log is known to be incomplete (a `.partial` name, a compact log without its closing line), or null. */
export function incompleteNote(path: string, info: DecisionLogInfo): string | null {
  if (path.endsWith(".partial")) return `${path} is the partial log of a run that did not finish; the report covers only the decisions written before it stopped`;
  if (info.complete === false) return `${path} ends without its closing line: the run that wrote it did not finish, and the report covers only the decisions written before it stopped`;
  return null;
}
