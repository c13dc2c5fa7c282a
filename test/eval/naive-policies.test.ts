import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { NaivePolicy } from "@leeway/eval";

const options = { inputs: 8, hidden: 4, commissioning: 100, calibration: 100, run: 5, forgetting: 0.99, seed: "1" } as const;

function rows(n: number, level: (i: number) => number, seed: string): Float64Array[] {
  const rng = new RandomSource(seed);
  return Array.from({ length: n }, (_, i) => Float64Array.from({ length: 8 }, (_, j) => 1 + 0.1 * Math.sin(j) + level(i) + 0.02 * rng.normal()));
}

describe("NaivePolicy", () => {
  it("frozen only: learns nothing after commissioning and alarms once when a step persists (re-armed only below the threshold)", () => {
    const p = new NaivePolicy({ ...options, kind: "frozen" });
    const ds = rows(600, (i) => (i >= 400 ? 1 : 0), "f").map((x) => p.observe(x));
    expect(ds.slice(0, 200).every((d) => d.phase === "commissioning")).toBe(true);
    expect(ds.slice(100).every((d) => d.action !== "learn")).toBe(true);
    const alarms = ds.flatMap((d, i) => (d.action === "alarm" ? [i] : []));
    expect(alarms).toEqual([404]);
  });

  it("always adapt: learns every sample and gets used to a persisting step the frozen model keeps calling anomalous", () => {
    const adapt = new NaivePolicy({ ...options, kind: "adapt" });
    const frozen = new NaivePolicy({ ...options, kind: "frozen" });
    const xs = rows(1500, (i) => (i >= 400 ? 1 : 0), "a");
    const ds = xs.map((x) => adapt.observe(x));
    const fs = xs.map((x) => frozen.observe(x));
    expect(ds.every((d) => d.action === "learn" || d.action === "alarm")).toBe(true);
    expect(ds.slice(1000).filter((d) => d.cause === "anomaly").length).toBeLessThan(25);
    expect(fs.slice(1000).every((d) => d.cause === "anomaly")).toBe(true);
  });
});
