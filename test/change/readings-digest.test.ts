import { createHash } from "node:crypto";
import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { Adwin, Cusum, EwmaChart, PageHinkley, type ChangeTest } from "@leeway/change";
import { changesByScan } from "./laws.js";

// The fixture was written from the tests as they computed when it was committed: a change of any
// reading (status, statistic, onset, … to the last bit), of any alarm found by scan or of any
// snapshot changes a digest. Speed work on observe and scan must keep it; the policy engine's
// decisions rest on these numbers.

/** A seeded stream of normal noise with level shifts, a slow ramp and a few non-finite samples. */
function stream(seed: string, n: number): Float64Array {
  const random = new RandomSource(seed);
  const xs = random.fillNormal(new Float64Array(n));
  let level = 0;
  for (let i = 0; i < n; i++) {
    if (i % 1500 === 700) level = random.uniform(-1.2, 1.2);
    const ramp = i >= 9000 && i < 12000 ? (i - 9000) * 0.001 : 0;
    xs[i] = (xs[i] as number) + level + ramp;
  }
  for (let i = 333; i < n; i += 4111) xs[i] = Number.NaN;
  return xs;
}

/** SHA-256 of every reading by observe (restarting after each change), of the changes found by scan and of both final snapshots. */
function digest(make: () => ChangeTest, xs: Float64Array): { readings: number; changes: number; sha256: string } {
  const hash = createHash("sha256");
  const byObserve = make();
  let changes = 0;
  for (let i = 0; i < xs.length; i++) {
    const reading = byObserve.observe(xs[i] as number);
    hash.update(JSON.stringify(reading));
    hash.update("\n");
    if (reading.status === "change") {
      changes += 1;
      byObserve.restart();
    }
  }
  hash.update(JSON.stringify(byObserve.snapshot()));
  const byScan = make();
  hash.update(JSON.stringify(changesByScan(byScan, xs)));
  hash.update(JSON.stringify(byScan.snapshot()));
  return { readings: xs.length, changes, sha256: hash.digest("hex") };
}

const subjects: Record<string, () => ChangeTest> = {
  "Cusum two-sided": () => new Cusum({ mean: 0, sigma: 1, k: 0.5, h: 5, nonFinite: "skip" }),
  "Cusum up, head start, burn-in": () => new Cusum({ burnIn: 50, k: 0.25, h: 8, headStart: 4, direction: "up", nonFinite: "skip" }),
  "EwmaChart asymptotic": () => new EwmaChart({ mean: 0, sigma: 1, lambda: 0.1, L: 3, nonFinite: "skip" }),
  "EwmaChart exact, down": () => new EwmaChart({ burnIn: 40, lambda: 0.2, L: 2.8, limits: "exact", direction: "down", nonFinite: "skip" }),
  "PageHinkley both": () => new PageHinkley({ alarmLevel: 25, tolerance: 0.05, direction: "both", nonFinite: "skip" }),
  "PageHinkley forgetting, known mean": () => new PageHinkley({ alarmLevel: 12, tolerance: 0.1, meanForgetting: 0.99, knownMean: 0.2, armAfter: 10, nonFinite: "skip" }),
  "PageHinkley forgetting": () => new PageHinkley({ alarmLevel: 12, tolerance: 0.1, meanForgetting: 0.995, direction: "both", nonFinite: "skip" }),
  "Adwin": () => new Adwin({ delta: 0.002, nonFinite: "skip" }),
  "Adwin hoeffding, small period": () => new Adwin({ delta: 0.01, bound: "hoeffding", checkPeriod: 5, buckets: 3, nonFinite: "skip" }),
};

describe("change-test readings stay as committed", () => {
  it("every reading, alarm and snapshot over a seeded stream of 20 000 samples", async () => {
    const xs = stream("change/readings-digest", 20_000);
    const out: Record<string, unknown> = {};
    for (const [name, make] of Object.entries(subjects)) out[name] = digest(make, xs);
    await expect(JSON.stringify(out, null, 2) + "\n").toMatchFileSnapshot("./fixtures/readings.digest.json");
  });
});
