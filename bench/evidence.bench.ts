import { it } from "vitest";
import { RandomSource } from "@leeway/core";
import { ChangePointPosterior, ConformalMartingale, Cusum } from "@leeway/change";
import { senSlopeInterval, timeToLimit } from "@leeway/stats";
import { changeOnset } from "@leeway/policy";
import { consume, sumLoop } from "./harness.js";
import { RoundsReport, timeRounds, type RoundTimes } from "./rounds.js";

// Cost of the planning evidence: the conformal martingale and the change-point posterior per sample,
// Sen's slope interval and the time to a limit per call. Per sample (or call), by process CPU time
// and wall time, min/median/max over seven rounds, with the sum loop over the same scores as the baseline;
// changeOnset per sample of the window it is given.
const keep = consume;

function scores(n: number, seed: string): Float64Array {
  const r = new RandomSource(seed);
  const xs = new Float64Array(n);
  for (let i = 0; i < n; i++) xs[i] = 0.07 * Math.exp(0.3 * r.normal());
  return xs;
}

it("evidence: cost per sample of the martingale and the posterior, per call of the time to a limit", () => {
  const xs = scores(1 << 15, "evidence-bench");
  const n = xs.length;
  const report = new RoundsReport("evidence");
  const baseline: RoundTimes = timeRounds(() => keep(sumLoop(xs)), n);
  report.add({ name: "sum loop (baseline)", unit: "sample", times: baseline });

  const cusum = new Cusum({ mean: 0.07, sigma: 0.02, h: 1e9 });
  report.add({ name: "Cusum scan (for scale)", unit: "sample", times: timeRounds(() => keep(cusum.scan(xs)), n) }, baseline);

  const jumper = new ConformalMartingale({ burnIn: 100, threshold: 1e300 });
  report.add({ name: "ConformalMartingale scan, jumper", unit: "sample", times: timeRounds(() => keep(jumper.scan(xs)), n) }, baseline);
  const power = new ConformalMartingale({ burnIn: 100, betting: "power", threshold: 1e300 });
  report.add({ name: "ConformalMartingale scan, power", unit: "sample", times: timeRounds(() => keep(power.scan(xs)), n) }, baseline);
  const mixture = new ConformalMartingale({ burnIn: 100, betting: "mixture", threshold: 1e300 });
  report.add({ name: "ConformalMartingale scan, mixture", unit: "sample", times: timeRounds(() => keep(mixture.scan(xs)), n) }, baseline);
  const observed = new ConformalMartingale({ burnIn: 1000, threshold: 1e300 });
  report.add(
    {
      name: "ConformalMartingale observe, jumper, grid 1000",
      unit: "sample",
      times: timeRounds(() => {
        let s = 0;
        for (let i = 0; i < n; i++) s += observed.observe(xs[i] as number).logValue;
        keep(s);
      }, n),
    },
    baseline,
  );

  const short = xs.subarray(0, 1 << 12);
  for (const max of [64, 256, 1024]) {
    const post = new ChangePointPosterior({ mean: Math.log(0.07), sigma: 0.3, maxHypotheses: max, expectedRunLength: 1000 });
    post.observeMany(short); // fill the hypotheses first
    report.add(
      {
        name: `ChangePointPosterior observe, maxHypotheses ${max}`,
        unit: "sample",
        times: timeRounds(() => {
          let s = 0;
          for (let i = 0; i < short.length; i++) s += post.observe(short[i] as number).changeProbability;
          keep(s);
        }, short.length),
        note: `${post.hypotheses} hypotheses kept`,
      },
      baseline,
    );
  }

  // changeOnset: one posterior over a window of normalised scores with a 1.5 σ shift 100 samples before its end,
  // per sample of the window (the settling rule would call it once per change)
  for (const [length, max] of [[900, 256], [900, 64], [3600, 256]] as const) {
    const z = new Float64Array(length);
    const r = new RandomSource(`onset-bench-${length}`);
    for (let i = 0; i < length; i++) z[i] = (i >= length - 100 ? 1.5 : 0) + r.normal();
    report.add(
      { name: `changeOnset, window ${length}, maxHypotheses ${max}`, unit: "sample", times: timeRounds(() => keep(changeOnset(z, { maxHypotheses: max }).runLength), length), note: `onset ${changeOnset(z, { maxHypotheses: max }).onset} (true ${length - 100})` },
      baseline,
    );
  }

  for (const w of [60, 240]) {
    const window = Float64Array.from({ length: w }, (_, i) => 0.07 + 0.0005 * i + 0.01 * Math.sin(i * 1.3));
    report.add({ name: `senSlopeInterval, ${w} values`, unit: "call", times: timeRounds(() => keep(senSlopeInterval(window).upper), 1) });
    report.add({ name: `timeToLimit, ${w} values`, unit: "call", times: timeRounds(() => {
      const t = timeToLimit(window, { limit: 1 });
      keep(t.status === "estimated" ? t.latest : 0);
    }, 1) });
  }
  report.write();
});
