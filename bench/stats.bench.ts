import { it } from "vitest";
import { RandomSource } from "@leeway/core";
import { EwMoments, Moments, P2Quantile, QuantileSketch, WindowMoments, WindowTrend } from "@leeway/stats";
import { BenchReport, consume, nsPerOp, sumLoop } from "./harness.js";

// Scores like a model's reconstruction losses on skid PS-2: positive, skewed (log-normal around 0.07).
function scores(n: number, seed: string): Float64Array {
  const r = new RandomSource(seed);
  const xs = new Float64Array(n);
  for (let i = 0; i < n; i++) xs[i] = 0.07 * Math.exp(0.3 * r.normal());
  return xs;
}

// Every timed closure below is its own function literal, so each call site sees one class only
// (a shared loop over several classes would turn the calls megamorphic and time the dispatch instead).
// The sum baseline is timed again right before each row (same run, same array), so that the load of a
// shared machine changes both sides of a ratio alike.
it("stats: sequential score statistics", () => {
  const xs = scores(1 << 16, "bench");
  const n = xs.length;
  const report = new BenchReport("stats");
  const row = (name: string, run: () => void, ops: number, note: string, options?: { minMs: number }): void => {
    const baseline = nsPerOp(() => consume(sumLoop(xs)), xs.length, { minMs: 60 });
    report.add(name, nsPerOp(run, ops, options), baseline, note);
  };

  const moments = new Moments();
  row("Moments observeMany", () => moments.observeMany(xs), n, "target <= 2");
  const momentsOne = new Moments();
  row("Moments observe", () => { for (let i = 0; i < n; i++) consume(momentsOne.observe(xs[i] as number).mean); }, n, "target <= 15");

  const ew = new EwMoments({ halfLife: 100 });
  row("EwMoments observeMany", () => ew.observeMany(xs), n, "target <= 4");
  const ewOne = new EwMoments({ halfLife: 100 });
  row("EwMoments observe", () => { for (let i = 0; i < n; i++) consume(ewOne.observe(xs[i] as number).mean); }, n, "target <= 15");

  const window = new WindowMoments({ width: 1024 });
  row("WindowMoments W=1024 observeMany", () => window.observeMany(xs), n, "target <= 8");
  const windowOne = new WindowMoments({ width: 1024 });
  row("WindowMoments W=1024 observe", () => { for (let i = 0; i < n; i++) consume(windowOne.observe(xs[i] as number).mean); }, n, "reported");

  const p2 = new P2Quantile({ p: 0.99 });
  row("P2Quantile p=0.99 observeMany", () => p2.observeMany(xs), n, "target <= 25");
  const p2One = new P2Quantile({ p: 0.99 });
  row("P2Quantile p=0.99 observe", () => { for (let i = 0; i < n; i++) consume(p2One.observe(xs[i] as number).estimate); }, n, "reported");

  const sketch = new QuantileSketch({ k: 200, seed: 1 });
  row("QuantileSketch k=200 observeMany", () => sketch.observeMany(xs), n, "target <= 50");
  const sketchOne = new QuantileSketch({ k: 200, seed: 1 });
  row("QuantileSketch k=200 observe", () => { for (let i = 0; i < n; i++) consume(sketchOne.observe(xs[i] as number).retained); }, n, "reported");
  row("QuantileSketch k=200 quantile(0.99)", () => { sketchOne.observe(0.07); consume(sketchOne.quantile(0.99)); }, 1, "per call after a change (rebuilds the sorted view)", { minMs: 50 });

  const short = xs.subarray(0, 1 << 12);
  const trend = new WindowTrend({ width: 256 });
  row("WindowTrend W=256 observeMany", () => trend.observeMany(short), short.length, "reported, O(W) per sample");
  const trendOne = new WindowTrend({ width: 256 });
  row("WindowTrend W=256 observe", () => { for (let i = 0; i < short.length; i++) consume(trendOne.observe(short[i] as number).z); }, short.length, "reported");
  row("WindowTrend W=256 slope()", () => consume(trend.slope()), 1, "per call, O(W^2)", { minMs: 50 });
  report.write();
});
