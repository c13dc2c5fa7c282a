import { cpus } from "node:os";
import { basename, dirname, join, resolve } from "node:path";
import { Worker } from "node:worker_threads";
import { checkTargets, qualityMarkdown, qualityScenarios, qualitySubset, qualityTable, runQualityScenario, type QualityScenario, type ScenarioOutcome } from "@leeway/eval";
import { numberFlag, stringFlag, type CommandSpec, type ParsedArguments } from "../args.js";
import { UsageError } from "../exit-codes.js";
import { writeWholeFile, type CliStreams } from "../io.js";
import { ProgressBar } from "../progress.js";
import { scriptedQualityOperator, OPERATOR_ANSWER_SECONDS } from "../quality-operator.js";
import { qualityPlot } from "../report/quality-plot.js";

/** Arguments, flags and help of `leeway quality`. */
export const qualitySpec: CommandSpec = {
  name: "quality",
  summary: "Runs the seeded decision-quality suite (every event kind, two sample rates, the engine against naive policies) and writes its tables and plot.",
  positionals: [],
  flags: [
    { name: "out", kind: "string", value: "FILE", description: "the Markdown document to write; the SVG plot is written next to it", defaultText: "docs/decision-quality.md" },
    { name: "workers", kind: "number", value: "N", description: "worker threads, 0 to 8 (0 runs in this thread)", defaultText: "2, or 1 on a single core" },
    { name: "title", kind: "string", value: "TEXT", description: "the document's title line", defaultText: '"the engine as built"' },
    { name: "subset", kind: "boolean", description: "run only the small fixed subset that the unit tests run (8 scenarios)" },
    { name: "only", kind: "string", value: "TEXT", description: "run only the scenarios whose id contains TEXT (for example \"fault/10 min\")" },
  ],
  details: [
    "The suite (@leeway/eval qualityScenarios): about 200 simulated streams of the Harbour Lane PS-2 pump over abrupt and gradual noise-floor shifts, sensor gain changes, recurring operating modes, slow bearing degradation, abrupt faults and quiet streams, at one sample per second and one per ten minutes, each with its ground truth. Every stream is fed to the decision engine with a scripted operator and unattended, to two naive policies (frozen only; always adapt) and to a CUSUM tuned with the true onsets.",
    "A decision aid for condition monitoring, not a safety function: these figures come from a simulator and do not validate thresholds for your machines.",
  ],
  examples: ["npm run quality", "leeway quality --out /tmp/quality.md --workers 1"],
};

/** leeway quality: runs the suite, prints a summary line, writes the document and the plot. */
export async function runQuality(parsed: ParsedArguments, io: CliStreams): Promise<number> {
  const out = resolve(io.cwd, stringFlag(parsed, "out") ?? "docs/decision-quality.md");
  const workers = numberFlag(parsed, "workers") ?? Math.min(2, cpus().length);
  if (!Number.isInteger(workers) || workers < 0 || workers > 8) throw new UsageError(`quality: flag --workers must be an integer in [0, 8], got ${workers}`);
  const title = stringFlag(parsed, "title") ?? "the engine as built";
  const only = stringFlag(parsed, "only");
  const scenarios = (parsed.flags.get("subset") === true ? qualitySubset() : qualityScenarios()).filter((s) => only === undefined || s.id.includes(only));
  if (scenarios.length === 0) throw new UsageError(`quality: no scenario id contains ${JSON.stringify(only)} (ids look like "fault/1 s/clog 1 min/1")`);
  const total = scenarios.reduce((s, q) => s + q.scenario.length, 0);
  const bar = new ProgressBar(io.stderr, io.stderrIsTTY, total, "quality");
  let done = 0;
  const progress = (samples: number): void => {
    done += samples;
    bar.update(done, done);
  };
  const started = Date.now();
  const cpu = process.cpuUsage();
  const outcomes = workers === 0 ? runHere(scenarios, progress) : await runInWorkers(scenarios, workers, progress);
  bar.done();
  const seconds = (Date.now() - started) / 1000;
  const cpuSeconds = (process.cpuUsage(cpu).user + process.cpuUsage(cpu).system) / 1e6;

  const rows = qualityTable(outcomes);
  const checks = checkTargets(rows);
  const plot = basename(out).replace(/\.md$/, "") + ".svg";
  const preamble = [
    `Written by \`leeway quality\` (\`npm run quality\`). Every stream is simulated once (512-sample frames at 5 kHz → 64 log-spectrum bands) and fed to each policy; the engine runs in feature mode through \`DecisionEngine.observe\` with a pool of 3 members of 8 hidden units and every other option at its default. "engine, operator": a scripted operator acknowledges every alarm and confirms every retrain question ${OPERATOR_ANSWER_SECONDS / 60} minutes after it is raised (at least one sample); "engine, unattended": nobody answers. "frozen only" and "always adapt" are the naive policies, "onset CUSUM" the chart tuned with the true onsets (see docs/decision-quality-suite.md for every definition).`,
    `This run: ${seconds.toFixed(0)} s wall, ${cpuSeconds.toFixed(0)} s CPU of the main thread, ${workers === 0 ? "in one thread" : `${workers} worker thread${workers === 1 ? "" : "s"}`}.`,
  ].join("\n\n");
  const markdown = qualityMarkdown(rows, checks, { title, scenarios: scenarios.length, samples: total, preamble, plot });
  await writeWholeFile(out, markdown);
  await writeWholeFile(join(dirname(out), plot), qualityPlot(rows));
  const met = checks.filter((c) => c.met).length;
  io.stdout.write(`quality: ${scenarios.length} scenarios, ${total} samples in ${seconds.toFixed(0)} s; targets met ${met} of ${checks.length}; wrote ${out}\n`);
  return 0;
}

function runHere(scenarios: readonly QualityScenario[], progress: (samples: number) => void): ScenarioOutcome[] {
  return scenarios.map((s) => runQualityScenario(s, { operator: scriptedQualityOperator, onProgress: progress }));
}

/** Hands scenarios one at a time to whichever worker is free (longest first, so the last ones finish together). */
function runInWorkers(scenarios: readonly QualityScenario[], count: number, progress: (samples: number) => void): Promise<ScenarioOutcome[]> {
  const order = scenarios.map((s, i) => ({ i, length: s.scenario.length })).sort((a, b) => b.length - a.length).map((x) => x.i);
  const results: ScenarioOutcome[] = new Array(scenarios.length);
  let next = 0;
  let finished = 0;
  return new Promise((resolvePromise, reject) => {
    const pool: Worker[] = [];
    const stopAll = (): void => {
      for (const w of pool) void w.terminate();
    };
    const feed = (w: Worker): void => {
      if (next < order.length) {
        const index = order[next++] as number;
        w.postMessage({ index, id: (scenarios[index] as QualityScenario).id });
      }
    };
    for (let k = 0; k < Math.min(count, scenarios.length); k++) {
      const w = new Worker(new URL("../quality-worker.js", import.meta.url));
      pool.push(w);
      w.on("message", (m: { progress?: number; index?: number; outcome?: ScenarioOutcome }) => {
        if (m.progress !== undefined) return progress(m.progress);
        results[m.index as number] = m.outcome as ScenarioOutcome;
        if (++finished === scenarios.length) {
          stopAll();
          resolvePromise(results);
        } else feed(w);
      });
      w.on("error", (error) => {
        stopAll();
        reject(error);
      });
      feed(w);
    }
  });
}
