import { expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { SlidingKsTest } from "@leeway/change";
import { consume } from "./harness.js";
import { RoundsReport, timeRounds } from "./rounds.js";
import { MergeSlidingKs } from "./sliding-ks-merge.js";

const keep = consume;

// The windowed KS test per sample once both windows are full (a test at every sample), against the
// version that merged both sorted windows at every test (bench/sliding-ks-merge.ts, kept as the
// baseline). Both scan the same normal stream from the same state; the threshold is out of reach, so
// every sample is tested. Times are ns per sample by process CPU time and by wall time, min/median/max
// over the rounds; the ratio is baseline median / tree median (CPU).
it("SlidingKsTest: segment-tree gaps against the merge per test, w = 100, 1,000, 10,000", () => {
  const random = new RandomSource("bench/sliding-ks");
  const report = new RoundsReport("sliding-ks");
  for (const w of [100, 1000, 10_000]) {
    const warm = random.fillNormal(new Float64Array(2 * w));
    const stream = random.fillNormal(new Float64Array(w < 10_000 ? 20_000 : 4000));
    const chunk = w === 10_000 ? 200 : 2000; // baseline samples per timed call
    const merge = new MergeSlidingKs(w, w, 2);
    const tree = new SlidingKsTest({ recentSize: w, criticalD: 2 });
    merge.scan(warm);
    tree.scan(warm);
    expect(Math.abs(tree.statistic - merge.statistic)).toBeLessThanOrEqual(1e-15);
    let at = 0;
    const next = (size: number): Float64Array => {
      if (at + size > stream.length) at = 0;
      const part = stream.subarray(at, at + size);
      at += size;
      return part;
    };
    const baseline = timeRounds(() => { merge.scan(next(chunk)); keep(merge.statistic); }, chunk, { rounds: 5, minMs: 150 });
    report.add({ name: `merge per test (baseline), w = ${w}`, unit: "sample", times: baseline });
    const treeChunk = 20_000;
    const big = random.fillNormal(new Float64Array(treeChunk));
    const times = timeRounds(() => { tree.scan(big); keep(tree.statistic); }, treeChunk, { rounds: 5, minMs: 150 });
    report.add({ name: `segment-tree gaps, w = ${w}`, unit: "sample", times, note: `${(baseline.cpu.median / times.cpu.median).toFixed(0)}× faster by CPU median, ${(baseline.wall.median / times.wall.median).toFixed(0)}× by wall` });
  }
  report.write();
});
