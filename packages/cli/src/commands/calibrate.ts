import { Adwin, calibrateThreshold, Cusum, EwmaChart, SlidingKsTest, PageHinkley, type ChangeTest } from "@leeway/change";
import { Moments } from "@leeway/stats";
import { numberFlag, stringFlag, type CommandSpec, type ParsedArguments } from "../args.js";
import { InputError, UsageError } from "../exit-codes.js";
import type { CliStreams } from "../io.js";
import { readScoreColumn } from "../input/score-column.js";
import { formatNumber } from "../report/scale.js";
import { calibrationWarnings } from "./calibration-warnings.js";

const TESTS = ["cusum", "page-hinkley", "ewma", "adwin", "ks"] as const;
type TestName = (typeof TESTS)[number];

/** Arguments, flags and help of `leeway calibrate`. */
export const calibrateSpec: CommandSpec = {
  name: "calibrate",
  summary: "Finds the threshold of a change test that gives a target in-control average run length (ARL0) on your normal scores.",
  positionals: [{ name: "scores", description: 'in-control scores: CSV (one column, or a "score" column) or NDJSON, or "-" for standard input' }],
  flags: [
    { name: "test", kind: "string", value: "NAME", description: "the change test: cusum, page-hinkley, ewma, adwin or ks", choices: TESTS },
    { name: "target-arl", kind: "number", value: "N", description: "wanted in-control average run length, in samples (≥ 2)" },
    { name: "column", kind: "string", value: "NAME", description: "the column holding the scores", defaultText: "the single numeric column, or score/live" },
    { name: "seed", kind: "number", value: "N", description: "seed of the bootstrap", defaultText: "1" },
    { name: "replicates", kind: "number", value: "N", description: "bootstrap streams per threshold tried", defaultText: "200" },
    { name: "block-length", kind: "number", value: "N", description: "moving-block bootstrap block length, in samples", defaultText: "round(n^(1/3))" },
    { name: "direction", kind: "string", value: "SIDE", description: "which shifts the test looks for: up, down or both (ignored by adwin and ks)", defaultText: "both", choices: ["up", "down", "both"] },
    { name: "k", kind: "number", value: "SIGMA", description: "cusum reference value k and page-hinkley tolerance δ, in σ of the scores", defaultText: "0.5" },
    { name: "lambda", kind: "number", value: "L", description: "ewma smoothing constant λ in [1e-9, 1]", defaultText: "0.2" },
    { name: "window", kind: "number", value: "N", description: "ks recent-window length, in samples (the reference is the first N samples of the stream)", defaultText: "100" },
    { name: "json", kind: "boolean", description: "print the result as one JSON object" },
  ],
  details: [
    "Method: moving-block bootstrap streams resampled from the scores (Künsch, 1989); for each threshold tried, a fresh test runs on every stream until its first change; ARL0 is the censored-geometric estimate of the mean run length; the threshold is bracketed and bisected, then its ARL0 and 95 % interval are re-estimated on fresh streams. μ0 and σ of cusum, ewma and page-hinkley are the mean and standard deviation of the scores. The threshold is h (cusum, in σ), λ (page-hinkley, in score units), L (ewma, in σ of the statistic), the ε_cut scale (adwin) or the critical D (ks).",
    "Cost grows with replicates × target ARL × about 20 thresholds tried.",
    "Warnings (stderr, and \"warnings\" in --json): the target lies outside the ARL0's 95 % interval (with the replicates and scores that would narrow it); the scores' two halves differ (two-sample Kolmogorov-Smirnov) or drift (Mann-Kendall on block means), each at p < 0.001, so they are not in-control scores.",
  ],
  examples: ["leeway calibrate commissioning-scores.csv --test cusum --target-arl 20000", "leeway calibrate scores.ndjson --test ks --target-arl 5000 --window 200 --json"],
};

/** A factory of change tests of one kind with everything but the threshold fixed. */
function testFactory(test: TestName, mean: number, sigma: number, parsed: ParsedArguments): { make: (t: number) => ChangeTest; describe: string; bracket: { lower?: number; upper?: number; initial?: number } } {
  const direction = (stringFlag(parsed, "direction") ?? "both") as "up" | "down" | "both";
  const k = numberFlag(parsed, "k") ?? 0.5;
  const sides = direction === "both" ? "two-sided" : `one-sided (${direction})`;
  switch (test) {
    case "cusum":
      return { make: (h) => new Cusum({ k, h, mean, sigma, direction }), describe: `CUSUM, k = ${k} σ, ${sides}; threshold h in σ`, bracket: { initial: 4 } };
    case "page-hinkley":
      return { make: (threshold) => new PageHinkley({ alarmLevel: threshold, tolerance: k * sigma, knownMean: mean, direction, armAfter: 0 }), describe: `Page-Hinkley, δ = ${formatNumber(k * sigma)} (${k} σ), ${sides}; threshold λ in score units`, bracket: { initial: 10 * sigma } };
    case "ewma": {
      const lambda = numberFlag(parsed, "lambda") ?? 0.2;
      return { make: (L) => new EwmaChart({ lambda, L, mean, sigma, direction }), describe: `EWMA chart, λ = ${lambda}, ${sides}; threshold L in σ of the EWMA statistic`, bracket: { initial: 3 } };
    }
    case "adwin":
      return { make: (threshold) => new Adwin({ threshold }), describe: "ADWIN, δ = 0.002, variance bound; threshold = scale of ε_cut", bracket: { initial: 1 } };
    case "ks": {
      const window = numberFlag(parsed, "window") ?? 100;
      return { make: (threshold) => new SlidingKsTest({ recentSize: window, criticalD: threshold }), describe: `windowed Kolmogorov-Smirnov, window ${window}, reference the first ${window} samples; threshold = critical D`, bracket: { lower: 1 / window, upper: 1 } };
    }
  }
}

/** leeway calibrate: prints the threshold and its estimated ARL0 with a 95 % interval. */
export async function runCalibrate(parsed: ParsedArguments, io: CliStreams): Promise<number> {
  const test = stringFlag(parsed, "test") as TestName | undefined;
  if (test === undefined) throw new UsageError("calibrate: flag --test is required (cusum, page-hinkley, ewma, adwin or ks)");
  const target = numberFlag(parsed, "target-arl");
  if (target === undefined) throw new UsageError("calibrate: flag --target-arl is required (the wanted in-control average run length, in samples)");
  if (!(target >= 2)) throw new UsageError(`calibrate: flag --target-arl must be a number >= 2, got ${target}`);
  const column = stringFlag(parsed, "column");
  const { name, scores, columnName } = await readScoreColumn(parsed.positionals[0] as string, io, column);
  if (scores.length < 10) throw new InputError(`${name}: calibration needs at least 10 scores, got ${scores.length}`);
  const moments = new Moments();
  moments.observeMany(scores);
  const mean = moments.mean;
  const sigma = moments.std;
  if (!(sigma > 0)) throw new InputError(`${name}: the scores are all equal (${mean}); a change test cannot be calibrated on a constant stream`);
  const factory = testFactory(test, mean, sigma, parsed);
  const seed = numberFlag(parsed, "seed") ?? 1;
  const replicates = numberFlag(parsed, "replicates");
  const blockLength = numberFlag(parsed, "block-length");
  const result = calibrateThreshold(factory.make, scores, {
    targetArl0: target,
    seed,
    ...factory.bracket,
    ...(replicates === undefined ? {} : { replicates }),
    ...(blockLength === undefined ? {} : { blockLength }),
  });
  const warnings = calibrationWarnings(scores, result, target);
  for (const w of warnings) io.stderr.write(`calibrate: warning: ${w}\n`);
  if (parsed.flags.get("json") === true) {
    io.stdout.write(`${JSON.stringify({ test, column: columnName, scores: scores.length, mean, sigma, targetArl0: target, threshold: result.threshold, arl0: result.arl0, interval: result.interval, replicates: result.replicates, censored: result.censored, evaluations: result.evaluations, warnings })}\n`);
    return 0;
  }
  const lines = [
    `test        ${factory.describe}`,
    `scores      ${scores.length} from ${name} (column ${columnName}); mean ${formatNumber(mean)}, standard deviation ${formatNumber(sigma)}`,
    `threshold   ${result.threshold.toPrecision(6)}`,
    `ARL0        ${Math.round(result.arl0)} samples (95 % interval ${Math.round(result.interval[0])} to ${Math.round(result.interval[1])}; target ${target})`,
    `bootstrap   ${result.replicates} streams per threshold, ${result.evaluations} thresholds tried, ${result.censored} final runs censored`,
  ];
  io.stdout.write(lines.join("\n") + "\n");
  return 0;
}
