import { it } from "vitest";
import { RandomSource } from "@leeway/core";
import { Adwin, calibrateThreshold, Cusum, EwmaChart, SlidingKsTest, PageHinkley } from "@leeway/change";
import { BenchReport, consume, nsPerOp, sumLoop } from "./harness.js";

// A module-local alias: the test runner turns imported names into property reads.
const keep = consume;

// The observe rows add each reading's statistic into a local sum and consume it once per pass: a
// call to consume() per sample would store a double in a module-level variable, which allocates a
// number box each time and costs about ten sum-loop elements by itself.
// Every timed closure below is its own function literal, so each call site sees one class only
// (a shared loop over several classes would turn the calls megamorphic and time the dispatch instead).
// On a shared machine the load changes within seconds, so each row alternates short timings of the
// sum baseline and of the work and keeps the fastest of each (the least disturbed); both sides come
// from the same run, and the baseline sums the same array the work reads.
it("change: scan, observe and calibration", () => {
  const random = new RandomSource("bench/change");
  const xs = random.fillNormal(new Float64Array(1 << 16));
  const n = xs.length;
  const million = random.fillNormal(new Float64Array(1_000_000));
  const report = new BenchReport("change");
  const row = (name: string, base: Float64Array, run: () => void, ops: number, rounds: number, minMs: number, note?: string): void => {
    let baseline = Infinity;
    let work = Infinity;
    for (let round = 0; round < rounds; round++) {
      baseline = Math.min(baseline, nsPerOp(() => consume(sumLoop(base)), base.length, { minMs: 15, repeats: 3 }));
      work = Math.min(work, nsPerOp(run, ops, { minMs, repeats: 3 }));
    }
    report.add(name, work, baseline, note);
  };

  // thresholds out of reach, so that scan runs through every sample
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
  row("SlidingKsTest.scan (w = 256, reference 256)", xs, () => keep(new SlidingKsTest({ recentSize: 256, referenceSize: 256, criticalD: 2 }).scan(xs)), n, 3, 50);

  // calibration of a CUSUM to ARL0 = 10^4 with 200 replicates, from 2000 commissioning scores
  const scores = random.fillNormal(new Float64Array(2000));
  let result = calibrateThreshold((h) => new Cusum({ mean: 0, sigma: 1, h }), scores, { targetArl0: 1e4, seed: 1, replicates: 200 });
  const calibrationNs = nsPerOp(() => {
    result = calibrateThreshold((h) => new Cusum({ mean: 0, sigma: 1, h }), scores, { targetArl0: 1e4, seed: 1, replicates: 200 });
  }, 1, { minMs: 1, repeats: 3 });
  const perSample = calibrationNs / result.samples;
  const scanNs = nsPerOp(() => keep(new Cusum({ mean: 0, sigma: 1, k: 0.5, h: 1e12 }).scan(xs)), n, { minMs: 60, repeats: 3 });
  const baseline = nsPerOp(() => consume(sumLoop(xs)), n, { minMs: 60, repeats: 3 });
  report.add(
    "calibrateThreshold (Cusum, ARL0 1e4, 200 replicates), per sample",
    perSample,
    baseline,
    `${(calibrationNs / 1e6).toFixed(0)} ms total, ${result.samples} samples, ${result.evaluations} evaluations, h = ${result.threshold.toFixed(3)}, ARL0 ${result.arl0.toFixed(0)} [${result.interval[0].toFixed(0)}, ${result.interval[1].toFixed(0)}]; scan ≈ ${(100 * scanNs / perSample).toFixed(0)} % of the time, bootstrap resampling the rest`,
  );
  report.write();
});
