import { it } from "vitest";
import { RandomSource } from "@leeway/core";
import { Adwin, calibrateThreshold, Cusum, EwmaChart, KsWindow, PageHinkley, type ChangeTest } from "@leeway/change";
import { BenchReport, consume, nsPerOp, sumBaselineNs, sumLoop } from "./harness.js";

function scanNs(make: () => ChangeTest, xs: Float64Array, options: { minMs?: number; repeats?: number } = {}): number {
  return nsPerOp(() => {
    const test = make();
    consume(test.scan(xs));
  }, xs.length, options);
}

// One loop per class, so that each call site sees one class (as a caller holding one test does).
function observeCusumNs(test: Cusum, xs: Float64Array): number {
  return nsPerOp(() => {
    let s = 0;
    for (let i = 0; i < xs.length; i++) s += test.observe(xs[i] as number).statistic;
    consume(s);
  }, xs.length);
}
function observeEwmaNs(test: EwmaChart, xs: Float64Array): number {
  return nsPerOp(() => {
    let s = 0;
    for (let i = 0; i < xs.length; i++) s += test.observe(xs[i] as number).statistic;
    consume(s);
  }, xs.length);
}
function observePageHinkleyNs(test: PageHinkley, xs: Float64Array): number {
  return nsPerOp(() => {
    let s = 0;
    for (let i = 0; i < xs.length; i++) s += test.observe(xs[i] as number).statistic;
    consume(s);
  }, xs.length);
}

it("change: scan, observe and calibration", () => {
  const random = new RandomSource("bench/change");
  const xs = random.fillNormal(new Float64Array(1 << 16));
  sumBaselineNs(xs);
  const report = new BenchReport("change");
  // The machine is shared: each ratio uses a baseline timed right before its row.
  const now = (): number => nsPerOp(() => consume(sumLoop(xs)), xs.length, { minMs: 60, repeats: 5 });
  let baseline = now();

  // thresholds out of reach, so that scan runs through every sample
  const cusum = (): Cusum => new Cusum({ mean: 0, sigma: 1, k: 0.5, h: 1e12 });
  const ewma = (): EwmaChart => new EwmaChart({ mean: 0, sigma: 1, lambda: 0.1, L: 1e6 });
  const ph = (): PageHinkley => new PageHinkley({ threshold: 1e12, delta: 0.05, direction: "both" });
  baseline = now();
  report.add("Cusum.scan (two-sided)", scanNs(cusum, xs), baseline);
  baseline = now();
  report.add("EwmaChart.scan (asymptotic limits)", scanNs(ewma, xs), baseline);
  baseline = now();
  report.add("EwmaChart.scan (exact limits)", scanNs(() => new EwmaChart({ mean: 0, sigma: 1, lambda: 0.1, L: 1e6, limits: "exact" }), xs), baseline);
  baseline = now();
  report.add("PageHinkley.scan (two-sided, running mean)", scanNs(ph, xs), baseline);
  baseline = now();
  report.add("Cusum.observe", observeCusumNs(cusum(), xs), baseline);
  baseline = now();
  report.add("EwmaChart.observe", observeEwmaNs(ewma(), xs), baseline);
  baseline = now();
  report.add("PageHinkley.observe", observePageHinkleyNs(ph(), xs), baseline);

  const million = random.fillNormal(new Float64Array(1_000_000));
  const adwin = new Adwin({ delta: 0.002 });
  const adwinNs = scanNs(() => new Adwin({ delta: 0.002 }), million, { minMs: 50, repeats: 3 });
  adwin.scan(million);
  baseline = now();
  report.add("Adwin.scan (δ = 0.002, 10^6 samples, amortized)", adwinNs, baseline, `final width ${adwin.width}, ${adwin.bucketCount} buckets`);
  baseline = now();
  report.add("KsWindow.scan (w = 256, reference 256)", scanNs(() => new KsWindow({ window: 256, referenceSize: 256, threshold: 2 }), xs, { minMs: 50, repeats: 3 }), baseline);

  // calibration of a CUSUM to ARL0 = 10^4 with 200 replicates, from 2000 commissioning scores
  const scores = random.fillNormal(new Float64Array(2000));
  let result = calibrateThreshold((h) => new Cusum({ mean: 0, sigma: 1, h }), scores, { targetArl0: 1e4, seed: 1, replicates: 200 });
  const calibrationNs = nsPerOp(() => {
    result = calibrateThreshold((h) => new Cusum({ mean: 0, sigma: 1, h }), scores, { targetArl0: 1e4, seed: 1, replicates: 200 });
  }, 1, { minMs: 1, repeats: 3 });
  const perSample = calibrationNs / result.samples;
  const scanShare = scanNs(cusum, xs) / perSample;
  baseline = now();
  report.add(
    "calibrateThreshold (Cusum, ARL0 1e4, 200 replicates), per sample",
    perSample,
    baseline,
    `${(calibrationNs / 1e6).toFixed(0)} ms total, ${result.samples} samples, ${result.evaluations} evaluations, h = ${result.threshold.toFixed(3)}, ARL0 ${result.arl0.toFixed(0)} [${result.interval[0].toFixed(0)}, ${result.interval[1].toFixed(0)}]; scan ≈ ${(100 * scanShare).toFixed(0)} % of the time, bootstrap resampling the rest`,
  );
  report.write();
});
