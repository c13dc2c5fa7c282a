import { closeSync, mkdirSync, openSync, renameSync, writeSync } from "node:fs";
import { resolve } from "node:path";
import { anomalyMask, replay, type Pipeline } from "@leeway/eval";
import { DecisionEngine, type Decision, type DecisionEngineOptions } from "@leeway/policy";
import { reduceBins, SpectrumAnalyzer } from "@leeway/signal";
import { harbourLane, MachineSimulator, type TruthEvent } from "@leeway/sim";
import { numberFlag, stringFlag, type CommandSpec, type ParsedArguments } from "../args.js";
import { decisionLine } from "../decision-log.js";
import { UsageError } from "../exit-codes.js";
import { writeWholeFile, type CliStreams } from "../io.js";
import { ScriptedOperator } from "../operator.js";
import { ProgressBar } from "../progress.js";
import { renderReport } from "../report/html.js";
import { TimelineCollector } from "../report/timeline.js";
import { countsText, metricsText, timelineText } from "../summary.js";
import { leewayVersion } from "../version.js";
import { reportMetrics } from "./report.js";

/** Samples per simulated hour the demo runs at by default (one frame a minute). */
export const DEMO_SCALE = 60;

/** Arguments, flags and help of `leeway demo`. */
export const demoSpec: CommandSpec = {
  name: "demo",
  summary: "Runs the embedded Harbour Lane PS-2 scenario end to end (simulator → spectra → autoencoder pool → decision engine → metrics) and writes a report.",
  positionals: [],
  flags: [
    { name: "scale", kind: "number", value: "S", description: "samples per simulated hour, 1 to 3600 (3600 = one frame a second, the real rate)", defaultText: String(DEMO_SCALE) },
    { name: "out", kind: "string", value: "DIR", description: "where to write report.html, decisions.ndjson and labels.json", defaultText: "leeway-demo" },
    { name: "seed", kind: "string", value: "SEED", description: "seed of the simulator and the engine", defaultText: '"harbour-lane"' },
  ],
  details: [
    "The scenario (invented): pump station Harbour Lane, skid PS-2, a centrifugal pump on a variable-frequency drive at 990, 1485 and 2970 rpm, an accelerometer on the drive-end bearing housing (5 kHz, 1024-sample frames). Seven simulated days: day 2 a standby compressor raises the noise floor (concept drift), from day 4 an outer-race bearing defect grows (degradation), day 6 a rag clogs the impeller for an hour (anomaly).",
    "Each frame becomes a 256-band log spectrum (@leeway/signal); the decision engine (@leeway/policy) commissions an OS-ELM autoencoder pool on the first day and decides on every sample; the decisions are measured against the scenario's ground truth (@leeway/eval). Time spans of the engine (trend windows, cool-down, retrain horizon) are scaled to the chosen rate.",
  ],
  examples: ["npx leeway demo", "leeway demo --scale 30 --out /tmp/ps2"],
};

/**
 * Engine options for the demo at `scale` samples per simulated hour: spans
 * that are times (commissioning a day, trend windows of hours, a cool-down
 * of half an hour, a daily retrain budget) are converted to samples; counts
 * that are sample sizes for statistics keep a floor.
 */
export function demoEngineOptions(scale: number, inputs: number, seed: string): DecisionEngineOptions {
  const hours = (h: number, floor: number): number => Math.max(floor, Math.round(h * scale));
  const settling = hours(3, 60);
  const trendBlock = Math.max(1, Math.round(scale / 6)); // ten minutes a block
  return {
    inputs,
    seed,
    commissioning: hours(24, 200),
    calibration: hours(6, 100),
    settling,
    settlingLimit: Math.max(settling, hours(12, 200)),
    trendBlock,
    trendWindow: Math.max(40, Math.round((36 * scale) / trendBlock)),
    coolDown: hours(1, 10),
    baselineHalfLife: hours(0.5, 60),
    retrainHorizon: hours(24, 100),
    targetArl0: Math.min(1e7, Math.max(1000, hours(168 * 4, 1000))),
    calibrationReplicates: 30,
  };
}

/** "day 3 14:05" for sample i at `scale` samples per hour. */
export function simulatedClock(i: number, scale: number): string {
  const minutes = Math.floor((i / scale) * 60);
  const day = Math.floor(minutes / 1440);
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
  const engine = new DecisionEngine(demoEngineOptions(scale, s.bins, seed));
  // Nobody is on duty in a simulation: an operator acknowledges an alarm an hour after it latched.
  const operator = new ScriptedOperator(engine, { acknowledgeAfter: Math.max(1, Math.round(scale)), confirmAfter: Math.max(1, Math.round(scale)) });
  const length = simulator.length;
  io.stderr.write(`demo: Harbour Lane PS-2, ${length} samples (${scale} per simulated hour, 7 days), output in ${outDir}\n`);

  mkdirSync(outDir, { recursive: true });
  const decisionsPath = resolve(outDir, "decisions.ndjson");
  const fd = openSync(`${decisionsPath}.partial`, "w");
  const collector = new TimelineCollector();
  const progress = new ProgressBar(io.stderr, io.stderrIsTTY, length, "demo");
  let pending: string[] = [];

  // sim → signal: frames of acceleration to a 256-band log spectrum (the
  // simulator's own spectrum scaling: log1p of band amplitude / reference).
  const frames: Iterable<Float64Array> = {
    *[Symbol.iterator]() {
      for (let raw = simulator.frame(); raw !== null; raw = simulator.frame()) {
        analyzer.power(raw.frame, power);
        reduceBins(belowNyquist, s.bins, bands, "sum");
        const x = new Float64Array(s.bins);
        for (let b = 0; b < x.length; b++) x[b] = Math.log1p(Math.sqrt(bands[b] as number) / s.reference);
        yield x;
      }
    },
  };
  // pool → policy: the engine scores with its autoencoder pool and decides.
  const pipeline: Pipeline<Float64Array> = {
    observe(x: Float64Array): Decision {
      const d = engine.observe(x);
      operator.after(d);
      collector.add(d);
      pending.push(decisionLine(d, null));
      if (pending.length >= 512) {
        writeSync(fd, pending.join("\n") + "\n");
        pending = [];
        progress.update(d.index + 1, d.index + 1);
      }
      return d;
    },
  };
  const events: TruthEvent[] = simulator.events;
  // → eval: the decisions measured against the scenario's ground truth.
  const { metrics } = replay(pipeline, frames, { events, anomaly: anomalyMask(events, length) }, { keepDecisions: false });
  if (pending.length > 0) writeSync(fd, pending.join("\n") + "\n");
  closeSync(fd);
  renameSync(`${decisionsPath}.partial`, decisionsPath);
  progress.done();

  const drawn = collector.result();
  const reportEvents = events.filter((e) => e.type !== "mode-change").map((e) => ({ cause: e.cause, start: e.start, end: e.end, id: e.id, type: e.type, label: e.label }));
  const labelsPath = resolve(outDir, "labels.json");
  await writeWholeFile(labelsPath, JSON.stringify({ events: events.map((e) => ({ cause: e.cause, start: e.start, end: e.end, id: e.id, type: e.type, label: e.label })) }, null, 1) + "\n");
  const reportPath = resolve(outDir, "report.html");
  const html = renderReport({
    title: "Harbour Lane pump station, skid PS-2",
    subtitle: `Demo: seven simulated days at ${scale} samples per hour — compressor installed on day 2 (concept drift), outer-race bearing defect from day 4 (degradation), impeller clog on day 6 (anomaly). Speed changes between 990, 1485 and 2970 rpm are not drawn as events.`,
    timeline: drawn,
    events: reportEvents,
    // The speed changes are labelled events too; the per-event table lists the other three.
    metrics: { ...reportMetrics(metrics), perEvent: metrics.perEvent.filter((e) => e.type !== "mode-change") },
    facts: [["scenario", "harbourLane (invented)"], ["operator", `scripted, ${operator.actions.length} actions`], ["scale", `${scale} samples per simulated hour`], ["seed", seed], ["features", `${s.bins}-band log spectrum`]],
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
      timelineText(drawn, 24, (i) => simulatedClock(i, scale)),
      ...(operator.actions.length === 0 ? [] : ["", `operator (scripted: acts one simulated hour after an alarm latches or a retrain awaits confirmation): ${operator.actions.length} actions`, ...operator.actions.slice(0, 8).map((a) => `  ${simulatedClock(a.index, scale).padEnd(18)} ${a.action}`), ...(operator.actions.length > 8 ? [`  … ${operator.actions.length - 8} more`] : [])]),
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
