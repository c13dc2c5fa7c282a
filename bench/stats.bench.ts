import { it } from "vitest";
import { RandomSource } from "@leeway/core";
import { EwMoments, Moments, P2Quantile, QuantileSketch, WindowMoments, WindowTrend } from "@leeway/stats";
import { BenchReport, consume, nsPerOp, sumBaselineNs } from "./harness.js";

// Scores like a model's reconstruction losses on skid PS-2: positive, skewed (log-normal around 0.07).
function scores(n: number, seed: string): Float64Array {
  const r = new RandomSource(seed);
  const xs = new Float64Array(n);
  for (let i = 0; i < n; i++) xs[i] = 0.07 * Math.exp(0.3 * r.normal());
  return xs;
}

// Every timed closure below is its own function literal, so each call site sees one class only
// (a shared loop over several classes would turn the calls megamorphic and time the dispatch instead).
it("stats: sequential score statistics", () => {
  const xs = scores(1 << 16, "bench");
  const n = xs.length;
  const baseline = sumBaselineNs(xs);
  const report = new BenchReport("stats");

  const moments = new Moments();
  report.add("Moments observeMany", nsPerOp(() => moments.observeMany(xs), n), baseline, "target <= 2");
  const momentsOne = new Moments();
  report.add("Moments observe", nsPerOp(() => { for (let i = 0; i < n; i++) consume(momentsOne.observe(xs[i] as number).mean); }, n), baseline, "target <= 15");

  const ew = new EwMoments({ halfLife: 100 });
  report.add("EwMoments observeMany", nsPerOp(() => ew.observeMany(xs), n), baseline, "target <= 4");
  const ewOne = new EwMoments({ halfLife: 100 });
  report.add("EwMoments observe", nsPerOp(() => { for (let i = 0; i < n; i++) consume(ewOne.observe(xs[i] as number).mean); }, n), baseline, "target <= 15");

  const window = new WindowMoments({ width: 1024 });
  report.add("WindowMoments W=1024 observeMany", nsPerOp(() => window.observeMany(xs), n), baseline, "target <= 8");
  const windowOne = new WindowMoments({ width: 1024 });
  report.add("WindowMoments W=1024 observe", nsPerOp(() => { for (let i = 0; i < n; i++) consume(windowOne.observe(xs[i] as number).mean); }, n), baseline, "reported");

  const p2 = new P2Quantile({ p: 0.99 });
  report.add("P2Quantile p=0.99 observeMany", nsPerOp(() => p2.observeMany(xs), n), baseline, "target <= 25");
  const p2One = new P2Quantile({ p: 0.99 });
  report.add("P2Quantile p=0.99 observe", nsPerOp(() => { for (let i = 0; i < n; i++) consume(p2One.observe(xs[i] as number).estimate); }, n), baseline, "reported");

  const sketch = new QuantileSketch({ k: 200, seed: 1 });
  report.add("QuantileSketch k=200 observeMany", nsPerOp(() => sketch.observeMany(xs), n), baseline, "target <= 50");
  const sketchOne = new QuantileSketch({ k: 200, seed: 1 });
  report.add("QuantileSketch k=200 observe", nsPerOp(() => { for (let i = 0; i < n; i++) consume(sketchOne.observe(xs[i] as number).retained); }, n), baseline, "reported");
  report.add("QuantileSketch k=200 quantile(0.99)", nsPerOp(() => { sketchOne.observe(0.07); consume(sketchOne.quantile(0.99)); }, 1, { minMs: 50 }), baseline, "per call after a change (rebuilds the sorted view)");

  const short = xs.subarray(0, 1 << 12);
  const trend = new WindowTrend({ width: 256 });
  report.add("WindowTrend W=256 observeMany", nsPerOp(() => trend.observeMany(short), short.length), baseline, "reported, O(W) per sample");
  const trendOne = new WindowTrend({ width: 256 });
  report.add("WindowTrend W=256 observe", nsPerOp(() => { for (let i = 0; i < short.length; i++) consume(trendOne.observe(short[i] as number).z); }, short.length), baseline, "reported");
  report.add("WindowTrend W=256 slope()", nsPerOp(() => consume(trend.slope()), 1, { minMs: 50 }), baseline, "per call, O(W^2)");
  report.write();
});
