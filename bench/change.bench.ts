import { it } from "vitest";
import { RandomSource } from "@leeway/core";
import { Adwin, calibrateThreshold, Cusum, EwmaChart, SlidingKsTest, PageHinkley } from "@leeway/change";
import { BenchReport, consume, nsPerOp, sumLoop, sumLoop4 } from "./harness.js";
import { timeRounds } from "./rounds.js";

// A module-local alias: the test runner turns imported names into property reads.
const keep = consume;

// The observe rows add each reading's statistic into a local sum and consume it once per pass: a
// call to consume() per sample would store a double in a module-level variable, which allocates a
// number box each time and costs about ten sum-loop elements by itself.
// Every timed closure below is its own function literal, so each call site sees one class only
// (a shared loop over several classes would turn the calls megamorphic and time the dispatch instead).
// Baseline: a 4-way unrolled loop that sums the same Float64Array (four accumulators, so it runs at
// the machine's load rate rather than at one add's latency). On a shared machine the load changes
// within seconds, so each row alternates rounds of the baseline and of the work, timed by process
// CPU time and by wall time; the ratio of each round pair is kept, and the row reports the
// min/median/max of those ratios (CPU; wall in the note).
it("change: scan, observe and calibration", () => {
  const random = new RandomSource("bench/change");
  const xs = random.fillNormal(new Float64Array(1 << 16));
  const n = xs.length;
  const million = random.fillNormal(new Float64Array(1_000_000));
  const report = new BenchReport("change");
  const spread = (v: number[]): string => {
    const s = [...v].sort((a, b) => a - b);
    return `${(s[0] as number).toFixed(2)}/${(s[s.length >> 1] as number).toFixed(2)}/${(s[s.length - 1] as number).toFixed(2)}`;
  };
  // Both baselines run long enough first to reach the engine's optimising tier: timed before that,
  // the 4-way loop ran up to 12× slower in some rows and made every ratio there look small.
  for (let k = 0; k < 400; k++) {
    consume(sumLoop4(xs));
    consume(sumLoop(xs));
    consume(sumLoop4(million));
    consume(sumLoop(million));
  }
  const median = (v: number[]): number => [...v].sort((a, b) => a - b)[v.length >> 1] as number;
  const row = (name: string, base: Float64Array, run: () => void, ops: number, rounds: number, minMs: number, note?: string, record = true): void => {
    const cpu: number[] = [];
    const wall: number[] = [];
    const plain: number[] = [];
    const workCpu: number[] = [];
    const baseCpu: number[] = [];
    for (let round = 0; round < rounds; round++) {
      const b = timeRounds(() => consume(sumLoop4(base)), base.length, { rounds: 1, minMs: Math.max(15, minMs) });
      const b1 = timeRounds(() => consume(sumLoop(base)), base.length, { rounds: 1, minMs: Math.max(15, minMs) });
      const w = timeRounds(run, ops, { rounds: 1, minMs });
      cpu.push(w.cpu.median / b.cpu.median);
      wall.push(w.wall.median / b.wall.median);
      plain.push(w.cpu.median / b1.cpu.median);
      workCpu.push(w.cpu.median);
      baseCpu.push(b.cpu.median);
    }
    if (record) report.add(name, median(workCpu), median(baseCpu), `cpu ratio ${spread(cpu)}, wall ratio ${spread(wall)}, cpu ratio to a one-accumulator sum ${spread(plain)} (min/median/max over ${rounds} round pairs)${note === undefined ? "" : "; " + note}`);
  };

  // thresholds out of reach, so that scan runs through every sample
  // (the first row runs once unrecorded: its baselines ran at several times their later cost while
  // the round machinery itself was still being compiled)
  row("warm-up", xs, () => keep(new Cusum({ mean: 0, sigma: 1, k: 0.5, h: 1e12 }).scan(xs)), n, 9, 15, undefined, false);
  row("Cusum.scan (two-sided)", xs, () => keep(new Cusum({ mean: 0, sigma: 1, k: 0.5, h: 1e12 }).scan(xs)), n, 9, 15);
  row("EwmaChart.scan (asymptotic limits)", xs, () => keep(new EwmaChart({ mean: 0, sigma: 1, lambda: 0.1, L: 1e6 }).scan(xs)), n, 9, 15);
  row("EwmaChart.scan (exact limits)", xs, () => keep(new EwmaChart({ mean: 0, sigma: 1, lambda: 0.1, L: 1e6, limits: "exact" }).scan(xs)), n, 9, 15);
  row("PageHinkley.scan (two-sided, running mean)", xs, () => keep(new PageHinkley({ alarmLevel: 1e12, tolerance: 0.05, direction: "both" }).scan(xs)), n, 9, 15);
  const cusum = new Cusum({ mean: 0, sigma: 1, k: 0.5, h: 1e12 });
  row("Cusum.observe", xs, () => { let s = 0; for (let i = 0; i < n; i++) s += cusum.observe(xs[i] as number).statistic; keep(s); }, n, 9, 15);
  const ewma = new EwmaChart({ mean: 0, sigma: 1, lambda: 0.1, L: 1e6 });
  row("EwmaChart.observe", xs, () => { let s = 0; for (let i = 0; i < n; i++) s += ewma.observe(xs[i] as number).statistic; keep(s); }, n, 9, 15);
  const ph = new PageHinkley({ alarmLevel: 1e12, tolerance: 0.05, direction: "both" });
  row("PageHinkley.observe", xs, () => { let s = 0; for (let i = 0; i < n; i++) s += ph.observe(xs[i] as number).statistic; keep(s); }, n, 9, 15);

  // each timing scans all 10^6 samples with a new window (so the window grows to 10^6 as in use);
  // the baseline sums the same million samples
  const adwin = new Adwin({ delta: 0.002 });
  adwin.scan(million);
  row("Adwin.scan (δ = 0.002, 10^6 samples, amortized)", million, () => keep(new Adwin({ delta: 0.002 }).scan(million)), million.length, 5, 1, `final width ${adwin.width}, ${adwin.bucketCount} buckets`);
  row("Adwin.observe (δ = 0.002, 10^6 samples, amortized)", million, () => {
    const a = new Adwin({ delta: 0.002 });
    let s = 0;
    for (let i = 0; i < million.length; i++) s += a.observe(million[i] as number).statistic;
    keep(s);
  }, million.length, 5, 1);
  row("SlidingKsTest.scan (w = 256, reference 256)", xs, () => keep(new SlidingKsTest({ recentSize: 256, referenceSize: 256, criticalD: 2 }).scan(xs)), n, 3, 50);

  // calibration of a CUSUM to ARL0 = 10^4 with 200 replicates, from 2000 commissioning scores
  const scores = random.fillNormal(new Float64Array(2000));
  let result = calibrateThreshold((h) => new Cusum({ mean: 0, sigma: 1, h }), scores, { targetArl0: 1e4, seed: 1, replicates: 200 });
  const calibrationNs = nsPerOp(() => {
    result = calibrateThreshold((h) => new Cusum({ mean: 0, sigma: 1, h }), scores, { targetArl0: 1e4, seed: 1, replicates: 200 });
  }, 1, { minMs: 1, repeats: 3 });
  const perSample = calibrationNs / result.samples;
  const scanNs = nsPerOp(() => keep(new Cusum({ mean: 0, sigma: 1, k: 0.5, h: 1e12 }).scan(xs)), n, { minMs: 60, repeats: 3 });
  const baseline = nsPerOp(() => consume(sumLoop4(xs)), n, { minMs: 60, repeats: 3 });
  report.add(
    "calibrateThreshold (Cusum, ARL0 1e4, 200 replicates), per sample",
    perSample,
    baseline,
    `${(calibrationNs / 1e6).toFixed(0)} ms total, ${result.samples} samples, ${result.evaluations} evaluations, h = ${result.threshold.toFixed(3)}, ARL0 ${result.arl0.toFixed(0)} [${result.interval[0].toFixed(0)}, ${result.interval[1].toFixed(0)}]; scan ≈ ${(100 * scanNs / perSample).toFixed(0)} % of the time, bootstrap resampling the rest`,
  );
  report.write();
});
