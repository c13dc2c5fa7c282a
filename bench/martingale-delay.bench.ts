import { mkdirSync, writeFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { it } from "vitest";
import { RandomSource } from "@leeway/core";
import { ConformalMartingale, Cusum } from "@leeway/change";

// Detection delay of ConformalMartingale against a one-sided CUSUM calibrated to the same false-alarm
// probability, on simulated log-normal score streams (PS-2's model losses around 0.07, 30 % spread).
// False alarms: the probability of any alarm within H = 10 000 samples of an in-control stream, measured
// for the martingale (λ = 100, bound 1 %) on R streams; the CUSUM's h is then set by bisection so that its
// probability on the same streams is the same (and, second row, equal to the bound 1/λ).
// Delays: the level rises by a factor at sample t₀ (1000 or 5000: the martingale's delay depends on the
// time in control); the delay is the mean of (alarm − t₀) over streams whose first alarm is at or after t₀.

const H = 10_000;
const R = 400;
const LEVEL = 0.07;
const SPREAD = 0.3; // σ of ln(score)

function stream(rng: RandomSource, length: number, at: number, factor: number): Float64Array {
  const xs = new Float64Array(length);
  for (let i = 0; i < length; i++) xs[i] = LEVEL * Math.exp(SPREAD * rng.normal()) * (i >= at ? factor : 1);
  return xs;
}

/** CUSUM on ln(score), known in-control level and spread, one-sided up, k = 0.5 σ. */
const cusum = (h: number): Cusum => new Cusum({ mean: Math.log(LEVEL), sigma: SPREAD, k: 0.5, h, direction: "up" });
const martingale = (seed: number): ConformalMartingale => new ConformalMartingale({ threshold: 100, burnIn: 200, seed });

function logs(xs: Float64Array): Float64Array {
  return xs.map((x) => Math.log(x));
}

it("ConformalMartingale: detection delay against a CUSUM at matched false-alarm probability", () => {
  const rng = new RandomSource("delay-bench");
  const nulls: Float64Array[] = [];
  for (let r = 0; r < R; r++) nulls.push(stream(rng, H, H, 1));
  let mAlarms = 0;
  nulls.forEach((xs, r) => {
    if (martingale(r).scan(xs) >= 0) mAlarms++;
  });
  const mFalse = mAlarms / R;
  const nullLogs = nulls.map(logs);
  const cusumFalse = (h: number): number => nullLogs.filter((xs) => cusum(h).scan(xs) >= 0).length / R;
  const hFor = (target: number): number => {
    let lo = 1;
    let hi = 40;
    for (let k = 0; k < 40; k++) {
      const mid = 0.5 * (lo + hi);
      if (cusumFalse(mid) > target) lo = mid;
      else hi = mid;
    }
    return hi;
  };
  // at a measured probability of 0 the CUSUM is matched to one alarm in R instead
  const hMatched = hFor(Math.max(mFalse, 1 / R));
  const hBound = hFor(0.01);
  console.log(`in control, H = ${H}: martingale (λ = 100) alarmed on ${mAlarms}/${R} streams; CUSUM h = ${hMatched.toFixed(2)} matches ${cusumFalse(hMatched).toFixed(4)}, h = ${hBound.toFixed(2)} gives ${cusumFalse(hBound).toFixed(4)} (the bound 0.01)`);

  const rows: Record<string, unknown>[] = [];
  for (const at of [1000, 5000]) {
    for (const factor of [1.2, 1.5, 2]) {
      const delays = { martingale: [] as number[], cusumMatched: [] as number[], cusumBound: [] as number[] };
      const missed = { martingale: 0, cusumMatched: 0, cusumBound: 0 };
      for (let r = 0; r < 200; r++) {
        const xs = stream(rng, at + 3000, at, factor);
        const ls = logs(xs);
        const record = (key: keyof typeof delays, hit: number): void => {
          if (hit >= at) delays[key].push(hit - at);
          else if (hit < 0) missed[key]++;
        };
        record("martingale", martingale(10_000 + r).scan(xs));
        record("cusumMatched", cusum(hMatched).scan(ls));
        record("cusumBound", cusum(hBound).scan(ls));
      }
      const mean = (v: number[]): number => v.reduce((a, b) => a + b, 0) / v.length;
      const row = {
        changeAt: at,
        factor,
        martingaleDelay: mean(delays.martingale),
        cusumMatchedDelay: mean(delays.cusumMatched),
        cusumBoundDelay: mean(delays.cusumBound),
        missedWithin3000: missed,
      };
      rows.push(row);
      console.log(`change ×${factor} at ${at}: mean delay martingale ${row.martingaleDelay.toFixed(1)}, CUSUM matched ${row.cusumMatchedDelay.toFixed(1)}, CUSUM at 1 % ${row.cusumBoundDelay.toFixed(1)} samples; missed within 3000: ${JSON.stringify(missed)}`);
    }
  }
  const dir = fileURLToPath(new URL("./results/", import.meta.url));
  mkdirSync(dir, { recursive: true });
  writeFileSync(`${dir}martingale-delay.json`, JSON.stringify({ horizon: H, streams: R, martingaleFalseAlarm: mFalse, hMatched, hBound, rows }, null, 2) + "\n");
});
