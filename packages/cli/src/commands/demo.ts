import { closeSync, openSync, renameSync, writeSync } from "node:fs";
import { resolve } from "node:path";
import { anomalyMask, replay, type Pipeline } from "@leeway/eval";
import { DecisionEngine, ModeRouter, type Decision, type DecisionEngineOptions } from "@leeway/policy";
import { reduceBins, SpectrumAnalyzer } from "@leeway/signal";
import { harbourLane, MachineSimulator, type TruthEvent } from "@leeway/sim";
import { numberFlag, stringFlag, type CommandSpec, type ParsedArguments } from "../args.js";
import { UsageError } from "../exit-codes.js";
import { prepareOutputFolder, writeWholeFile, type CliStreams } from "../io.js";
import { logFormat, type LogForm } from "../log/compact-log.js";
import { ProgressBar } from "../progress.js";
import { renderReport } from "../report/html.js";
import { ReportCollector } from "../report/lanes.js";
import { countsText, metricsText, timelineText } from "../summary.js";
import { leewayVersion } from "../version.js";

/** The demo's operating modes (the simulator's names) as the report names them. */
const SPEED_WORDS: Readonly<Record<string, string>> = { low: "990 rpm", mid: "1485 rpm", high: "2970 rpm" };

/**
 * The demo's limit on the active reference's score (score units), whose time
 * to be reached every degradation decision estimates: about five σ above the
 * normal level at 2970 rpm, four at 1485 rpm (an invented site limit).
 */
export const DEMO_LIMIT = 0.25;

/** Samples per simulated hour the demo runs at by default (one frame every ten seconds). */
export const DEMO_SCALE = 360;

/** Arguments, flags and help of `leeway demo`. */
export const demoSpec: CommandSpec = {
  name: "demo",
  summary: "Runs the embedded Harbour Lane PS-2 scenario end to end (simulator → spectra → autoencoder pool → decision engine → metrics) and writes a report.",
  positionals: [],
  flags: [
    { name: "scale", kind: "number", value: "S", description: "samples per simulated hour, 1 to 3600 (3600 = one frame a second, the real rate)", defaultText: String(DEMO_SCALE) },
    { name: "out", kind: "string", value: "DIR", description: "where to write report.html, the decision log and labels.json (an earlier demo's files there are replaced)", defaultText: "leeway-demo" },
    { name: "log", kind: "string", value: "FORM", description: "decision log form: compact (decisions.log) or full (decisions.ndjson, every decision with its whole evidence)", defaultText: "compact", choices: ["compact", "full"] },
    { name: "seed", kind: "string", value: "SEED", description: "seed of the simulator and the engine", defaultText: '"harbour-lane"' },
  ],
  details: [
    "The scenario (invented): pump station Harbour Lane, skid PS-2, a centrifugal pump on a variable-frequency drive at 990, 1485 and 2970 rpm, an accelerometer on the drive-end bearing housing (5 kHz, 1024-sample frames). Seven simulated days: day 2 a standby compressor raises the noise floor (concept drift), from day 4 an outer-race bearing defect grows (degradation), day 6 a rag clogs the impeller for an hour (anomaly).",
    `Each frame becomes a 256-band log spectrum (@leeway/signal). The host knows the speed setpoint from the drive, so each spectrum goes to the decision engine of its speed (@leeway/policy, one OS-ELM autoencoder pool each, commissioned on the first visit to that speed); a scripted operator acknowledges each alarm four samples after it latched and, standing in for the site log that records the compressor installation, confirms each retrain the engines ask for four samples after they ask (a real operator would confirm only changes known to be benign). The decisions are measured against the scenario's ground truth (@leeway/eval). The engines' time spans are scaled to the chosen rate. Each engine estimates when its reference's score reaches ${DEMO_LIMIT} (an invented site limit) at the current rate; an open degradation alarm shows it in the report's headline.`,
  ],
  examples: ["npx leeway demo", "leeway demo --scale 30 --out /tmp/ps2"],
};

/**
 * Engine options for the demo at `scale` samples per simulated hour: the
 * policy guide's Harbour Lane settings at one sample every ten seconds
 * (scale 360), with every span in samples scaled by scale/360 and floors that
 * keep the statistics meaningful at small scales.
 */
export function demoEngineOptions(scale: number, inputs: number, seed: string): DecisionEngineOptions {
  const f = scale / 360;
  const span = (samples: number, floor: number): number => Math.max(floor, Math.round(samples * f));
  return {
    inputs,
    seed,
    commissioning: span(120, 40),
    calibration: span(120, 40),
    settling: span(90, 30),
    settlingLimit: span(360, 120),
    trendBlock: Math.max(1, Math.round(6 * f)),
    coolDown: span(180, 10),
    baselineHalfLife: span(180, 20),
    targetArl0: span(2000, 500),
    retrainHorizon: span(8640, 200),
    hidden: 16,
    members: 3,
    limit: DEMO_LIMIT,
  };
}

/** "day 2 10:05" for sample i at `scale` samples per hour (days counted from 1, as the scenario tells them). */
export function simulatedClock(i: number, scale: number): string {
  const minutes = Math.floor((i / scale) * 60);
  const day = Math.floor(minutes / 1440) + 1;
  const hh = Math.floor((minutes % 1440) / 60);
  const mm = minutes % 60;
  return `day ${day} ${String(hh).padStart(2, "0")}:${String(mm).padStart(2, "0")}`;
}

/** leeway demo. */
export async function runDemo(parsed: ParsedArguments, io: CliStreams): Promise<number> {
  const scale = numberFlag(parsed, "scale") ?? DEMO_SCALE;
  if (!(scale >= 1 && scale <= 3600)) throw new UsageError(`demo: flag --scale must be a number in [1, 3600] (samples per simulated hour), got ${scale}`);
  const seed = stringFlag(parsed, "seed") ?? "harbour-lane";
  const outDir = resolve(io.cwd, stringFlag(parsed, "out") ?? "leeway-demo");
  const started = Date.now();

  const scenario = harbourLane({ scale, seed });
  const simulator = new MachineSimulator(scenario);
  const s = simulator.scenario;
  const analyzer = new SpectrumAnalyzer({ size: s.frameSize, sampleRate: s.sampleRate, window: s.window });
  const power = new Float64Array(analyzer.bins);
  const belowNyquist = power.subarray(0, s.frameSize / 2);
  const bands = new Float64Array(s.bins);
  // One engine per speed setting, as a host that reads the setpoint from the drive would run them.
  const router = new ModeRouter((mode) => new DecisionEngine(demoEngineOptions(scale, s.bins, `${seed}/${mode}`)), { acknowledgeAfter: 4, confirmAfter: 4 });
  const length = simulator.length;
  io.stderr.write(`demo: Harbour Lane PS-2, ${length} samples (${scale} per simulated hour, 7 days), output in ${outDir}\n`);

  await prepareOutputFolder(outDir, ["decisions.log", "decisions.ndjson", "report.html", "labels.json"], true, "");
  const format = logFormat((stringFlag(parsed, "log") ?? "compact") as LogForm);
  const decisionsPath = resolve(outDir, format.fileName);
  const fd = openSync(`${decisionsPath}.partial`, "w");
  const header = format.header();
  if (header !== null) writeSync(fd, header + "\n");
  const collector = new ReportCollector();
  const progress = new ProgressBar(io.stderr, io.stderrIsTTY, length, "demo");
  let pending: string[] = [];

  // sim → signal: frames of acceleration to a 256-band log spectrum (the
  // simulator's own spectrum scaling: log1p of band amplitude / reference).
  const frames: Iterable<{ x: Float64Array; mode: string }> = {
    *[Symbol.iterator]() {
      for (let raw = simulator.frame(); raw !== null; raw = simulator.frame()) {
        analyzer.power(raw.frame, power);
        reduceBins(belowNyquist, s.bins, bands, "sum");
        const x = new Float64Array(s.bins);
        for (let b = 0; b < x.length; b++) x[b] = Math.log1p(Math.sqrt(bands[b] as number) / s.reference);
        yield { x, mode: raw.truth.mode };
      }
    },
  };
  // pool → policy: the engine of the sample's speed scores it with its autoencoder pool and decides.
  const pipeline: Pipeline<{ x: Float64Array; mode: string }> = {
    observe(sample: { x: Float64Array; mode: string }): Decision {
      const d = router.observe(sample.x, sample.mode);
      collector.add(d);
      pending.push(format.line(d, null));
      if (pending.length >= 512) {
        writeSync(fd, pending.join("\n") + "\n");
        pending = [];
        progress.update(d.index + 1, d.index + 1);
      }
      return d;
    },
  };
  // → eval: the decisions measured against the scenario's ground truth. The speed changes are
  // known to the host (they route the samples), so the events to find are the other three.
  const events: TruthEvent[] = simulator.events.filter((e) => e.type !== "mode-change");
  const anomaly = anomalyMask(events, length);
  const { metrics } = replay(pipeline, frames, { events, anomaly }, { keepDecisions: false });
  if (pending.length > 0) writeSync(fd, pending.join("\n") + "\n");
  const end = format.end(length);
  if (end !== null) writeSync(fd, end + "\n");
  closeSync(fd);
  renameSync(`${decisionsPath}.partial`, decisionsPath);
  progress.done();

  const data = collector.result();
  const drawn = data.all;
  const reportEvents = events.map((e) => ({ cause: e.cause, start: e.start, end: e.end, id: e.id, type: e.type, label: e.label }));
  const labelsPath = resolve(outDir, "labels.json");
  await writeWholeFile(labelsPath, `{"events": ${JSON.stringify(reportEvents, null, 1)},\n"anomaly": [${anomaly.map((a) => (a ? 1 : 0)).join(",")}]}\n`);
  const reportPath = resolve(outDir, "report.html");
  const html = renderReport({
    title: "Harbour Lane pump station, skid PS-2",
    subtitle: `Demo: seven simulated days at ${scale} samples per hour — a standby compressor installed on day 2 (changed conditions), an outer-race bearing defect growing from day 4 (slow degradation), a rag clogging the impeller on day 6 (anomaly). One engine per speed setting, each in a lane of its own.`,
    timeline: drawn,
    lanes: data.lanes,
    laneTitle: (mode) => `Engine at ${SPEED_WORDS[mode] ?? mode}`,
    samplePeriod: 3600 / scale,
    events: reportEvents,
    metrics,
    facts: [["scenario", "harbourLane (invented)"], ["engines", `one per speed (${router.modes.join(", ")})`], ["operator", `scripted, ${router.operatorActions().length} actions`], ["scale", `${scale} samples per simulated hour`], ["seed", seed], ["features", `${s.bins}-band log spectrum`]],
    version: leewayVersion(),
  });
  await writeWholeFile(reportPath, html);
  const seconds = (Date.now() - started) / 1000;
  io.stdout.write(
    [
      `Harbour Lane PS-2 — ${length} samples in ${seconds.toFixed(1)} s: ${countsText(drawn)}`,
      "",
      "truth:",
      ...reportEvents.map((e) => `  ${simulatedClock(e.start, scale).padEnd(18)} ${e.cause.padEnd(14)} ${e.label}`),
      "",
      "decisions (changes of action or cause, routine learning left out):",
      timelineText(drawn, 30, (i) => simulatedClock(i, scale)),
      ...operatorLines(router.operatorActions(), scale),
      "",
      "metrics:",
      metricsText(metrics),
      "",
      `wrote ${reportPath}`,
      `wrote ${decisionsPath}`,
      `wrote ${labelsPath}`,
      "",
    ].join("\n"),
  );
  return 0;
}

function operatorLines(actions: { index: number; mode: string; action: string }[], scale: number): string[] {
  if (actions.length === 0) return [];
  const lines = ["", `operator (scripted: acknowledges each alarm and confirms each retrain question four samples after it is raised): ${actions.length} actions`];
  for (const a of actions.slice(0, 6)) lines.push(`  ${simulatedClock(a.index, scale).padEnd(18)} ${a.action.padEnd(18)} ${a.mode} engine`);
  if (actions.length > 6) lines.push(`  … ${actions.length - 6} more`);
  return lines;
}
