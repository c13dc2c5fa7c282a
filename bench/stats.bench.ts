import { it } from "vitest";
import { RandomSource } from "@leeway/core";
import { EwMoments, Moments, P2Quantile, QuantileSketch, WindowMoments, WindowTrend } from "@leeway/stats";
import { BenchReport, consume, nsPerOp, sumLoop } from "./harness.js";

// A module-local alias: the test runner turns imported names into property reads.
const keep = consume;

// Scores like a model's reconstruction losses on skid PS-2: positive, skewed (log-normal around 0.07).
function scores(n: number, seed: string): Float64Array {
  const r = new RandomSource(seed);
  const xs = new Float64Array(n);
  for (let i = 0; i < n; i++) xs[i] = 0.07 * Math.exp(0.3 * r.normal());
  return xs;
}

// The observe rows add one field of each reading into a local sum and consume it once per pass: a
// call to consume() per sample would store a double in a module-level variable, which allocates a
// number box each time and costs about ten sum-loop elements by itself.
// Every timed closure below is its own function literal, so each call site sees one class only
// (a shared loop over several classes would turn the calls megamorphic and time the dispatch instead).
// On a shared machine the load changes within seconds, so each row alternates short timings of the
// sum baseline and of the work, nine rounds, and keeps the fastest of each (the least disturbed);
// both sides come from the same run and the same array.
it("stats: sequential score statistics", () => {
  const xs = scores(1 << 16, "bench");
  const n = xs.length;
  const report = new BenchReport("stats");
  const row = (name: string, run: () => void, ops: number, note: string): void => {
    let baseline = Infinity;
    let work = Infinity;
    for (let round = 0; round < 9; round++) {
      baseline = Math.min(baseline, nsPerOp(() => consume(sumLoop(xs)), xs.length, { minMs: 15, repeats: 3 }));
      work = Math.min(work, nsPerOp(run, ops, { minMs: 15, repeats: 3 }));
    }
    report.add(name, work, baseline, note);
  };

  const moments = new Moments();
  row("Moments observeMany", () => moments.observeMany(xs), n, "target <= 2");
  const momentsOne = new Moments();
  row("Moments observe", () => { let s = 0; for (let i = 0; i < n; i++) s += momentsOne.observe(xs[i] as number).mean; keep(s); }, n, "target <= 15");

  const ew = new EwMoments({ halfLife: 100 });
  row("EwMoments observeMany", () => ew.observeMany(xs), n, "target <= 4");
  const ewOne = new EwMoments({ halfLife: 100 });
  row("EwMoments observe", () => { let s = 0; for (let i = 0; i < n; i++) s += ewOne.observe(xs[i] as number).mean; keep(s); }, n, "target <= 15");

  const window = new WindowMoments({ width: 1024 });
  row("WindowMoments W=1024 observeMany", () => window.observeMany(xs), n, "target <= 8");
  const windowOne = new WindowMoments({ width: 1024 });
  row("WindowMoments W=1024 observe", () => { let s = 0; for (let i = 0; i < n; i++) s += windowOne.observe(xs[i] as number).mean; keep(s); }, n, "reported");

  const p2 = new P2Quantile({ p: 0.99 });
  row("P2Quantile p=0.99 observeMany", () => p2.observeMany(xs), n, "target <= 25");
  const p2One = new P2Quantile({ p: 0.99 });
  row("P2Quantile p=0.99 observe", () => { let s = 0; for (let i = 0; i < n; i++) s += p2One.observe(xs[i] as number).estimate; keep(s); }, n, "reported");

  const sketch = new QuantileSketch({ k: 200, seed: 1 });
  row("QuantileSketch k=200 observeMany", () => sketch.observeMany(xs), n, "target <= 50");
  const sketchOne = new QuantileSketch({ k: 200, seed: 1 });
  row("QuantileSketch k=200 observe", () => { let s = 0; for (let i = 0; i < n; i++) s += sketchOne.observe(xs[i] as number).retained; keep(s); }, n, "reported");
  row("QuantileSketch k=200 quantile(0.99)", () => { sketchOne.observe(0.07); keep(sketchOne.quantile(0.99)); }, 1, "per call after a change (rebuilds the sorted view)");

  const short = xs.subarray(0, 1 << 12);
  const trend = new WindowTrend({ width: 256 });
  row("WindowTrend W=256 observeMany", () => trend.observeMany(short), short.length, "reported, O(W) per sample");
  const trendOne = new WindowTrend({ width: 256 });
  row("WindowTrend W=256 observe", () => { let s = 0; for (let i = 0; i < short.length; i++) s += trendOne.observe(short[i] as number).z; keep(s); }, short.length, "reported");
  row("WindowTrend W=256 slope()", () => consume(trend.slope()), 1, "per call, O(W^2)");
  report.write();
});
