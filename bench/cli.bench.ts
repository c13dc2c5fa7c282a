import { mkdtempSync, rmSync, statSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Readable, Writable } from "node:stream";
import { it } from "vitest";
import { RandomSource } from "@leeway/core";
import { main } from "../packages/cli/src/main.js";
import { readLines } from "../packages/cli/src/input/lines.js";
import { readSamples } from "../packages/cli/src/input/samples.js";
import { BenchReport, consume, sumBaselineNs } from "./harness.js";

const nullSink = (): Writable => new Writable({ write: (_c, _e, done) => done() });

function chunks(buffer: Buffer): Readable {
  const parts: Buffer[] = [];
  for (let i = 0; i < buffer.length; i += 1 << 16) parts.push(buffer.subarray(i, i + (1 << 16)));
  return Readable.from(parts);
}

/** Median wall time in ns of an async run, after one warm-up. */
async function medianNs(run: () => Promise<void>, repeats = 5): Promise<number> {
  await run();
  const times: number[] = [];
  for (let r = 0; r < repeats; r++) {
    const t0 = process.hrtime.bigint();
    await run();
    times.push(Number(process.hrtime.bigint() - t0));
  }
  times.sort((a, b) => a - b);
  return times[Math.floor(times.length / 2)] as number;
}

/** Only what replay does before the engine: lines, CSV fields, numbers. */
async function parseOnly(buffer: Buffer): Promise<number> {
  let sum = 0;
  for await (const batch of readSamples(readLines(chunks(buffer), { name: "bench" }), { name: "bench" })) {
    for (const row of batch.rows) sum += row.values[0] as number;
  }
  return sum;
}

async function replay(args: string[], stdin: Buffer | null): Promise<number> {
  return main(["replay", stdin === null ? args[0] as string : "-", ...args.slice(stdin === null ? 1 : 0)], {
    stdin: stdin === null ? Readable.from([]) : chunks(stdin),
    stdout: nullSink(),
    stderr: nullSink(),
    stderrIsTTY: false,
    cwd: process.cwd(),
  });
}

function scoreCsv(n: number): Buffer {
  const rng = new RandomSource("bench-scores");
  const lines = ["time,score,ref_commissioning"];
  for (let i = 0; i < n; i++) {
    const live = 0.07 * Math.exp(0.1 * rng.normal());
    lines.push(`${i},${live.toPrecision(6)},${(live * Math.exp(0.05 * rng.normal())).toPrecision(6)}`);
  }
  return Buffer.from(lines.join("\n") + "\n");
}

function featureCsv(n: number, width: number): Buffer {
  const rng = new RandomSource("bench-features");
  const header = ["time", ...Array.from({ length: width }, (_, b) => `b${b}`)].join(",");
  const lines = [header];
  for (let i = 0; i < n; i++) {
    const row: string[] = [String(i)];
    for (let b = 0; b < width; b++) row.push((0.5 + 0.2 * Math.sin(b / 9 + (i % 3)) + 0.02 * rng.normal()).toPrecision(5));
    lines.push(row.join(","));
  }
  return Buffer.from(lines.join("\n") + "\n");
}

it("cli: replay throughput against parse-only, a 10^6-sample run, report size", async () => {
  const report = new BenchReport("cli");
  const dir = mkdtempSync(join(tmpdir(), "leeway-cli-bench-"));
  try {
    const config = join(dir, "pipeline.json");
    // Short commissioning and calibration so that steady state dominates the timing.
    writeFileSync(config, JSON.stringify({ engine: { commissioning: 200, calibration: 100, targetArl0: 2000, calibrationReplicates: 10 } }));
    const sum = sumBaselineNs(new RandomSource(1).fillUniform(new Float64Array(1 << 16)));

    const nScores = 100_000;
    const scores = scoreCsv(nScores);
    const parseScores = (await medianNs(async () => consume(await parseOnly(scores)))) / nScores;
    report.add("parse-only, score CSV (3 columns), per sample", parseScores, sum, `${(1e9 / parseScores / 1e3).toFixed(0)}k samples/s`);
    const replayScores = (await medianNs(async () => consume(await replay(["--config", config], scores)), 3)) / nScores;
    report.add("replay, score-only CSV, per sample (vs parse-only)", replayScores, parseScores, `${(1e9 / replayScores / 1e3).toFixed(1)}k samples/s`);

    const nFeatures = 3000;
    const features = featureCsv(nFeatures, 256);
    const parseFeatures = (await medianNs(async () => consume(await parseOnly(features)))) / nFeatures;
    report.add("parse-only, 256-column CSV, per sample", parseFeatures, sum, `${(1e9 / parseFeatures / 1e3).toFixed(1)}k samples/s`);
    const replayFeatures = (await medianNs(async () => consume(await replay(["--config", config], features)), 3)) / nFeatures;
    report.add("replay, 256-feature CSV, per sample (vs parse-only)", replayFeatures, parseFeatures, `${(1e9 / replayFeatures / 1e3).toFixed(2)}k samples/s`);

    // One run of 10^6 score-only samples from a file, decisions and report into --out.
    const big = join(dir, "scores-1m.csv");
    writeFileSync(big, scoreCsv(1_000_000));
    const out = join(dir, "run");
    const t0 = process.hrtime.bigint();
    const code = await replay([big, "--config", config, "--out", out], null);
    const seconds = Number(process.hrtime.bigint() - t0) / 1e9;
    if (code !== 0) throw new Error(`the 10^6-sample replay exited ${code}`);
    const reportBytes = statSync(join(out, "report.html")).size;
    const decisionBytes = statSync(join(out, "decisions.ndjson")).size;
    report.add("replay --out, 10^6 score-only samples, per sample (vs parse-only)", (seconds * 1e9) / 1e6, parseScores, `${seconds.toFixed(1)} s in all; report.html ${(reportBytes / 1024).toFixed(0)} KiB; decisions ${(decisionBytes / 2 ** 20).toFixed(0)} MiB`);
    report.write();
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
});
