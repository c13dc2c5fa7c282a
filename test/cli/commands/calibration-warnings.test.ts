import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { calibrationWarnings } from "../../../packages/cli/src/commands/calibration-warnings.js";
import { runCli } from "../run-cli.js";

function normal(n: number, seed: number, level: (i: number) => number = () => 0.07): Float64Array {
  const rng = new RandomSource(seed);
  return Float64Array.from({ length: n }, (_, i) => level(i) + 0.005 * rng.normal());
}

describe("calibration warnings", () => {
  it("an interval that misses the target is named, with the replicates and scores that would narrow it", () => {
    const w = calibrationWarnings(normal(3000, 1), { arl0: 1716, interval: [1498, 1934], replicates: 200 }, 2000);
    expect(w).toHaveLength(1);
    expect(w[0]).toContain("the target ARL0 2000 lies outside the 95 % interval 1498 to 1934");
    expect(w[0]).toContain("--replicates 800");
    expect(w[0]).toContain("12000 instead of 3000");
    expect(calibrationWarnings(normal(3000, 1), { arl0: 1950, interval: [1700, 2200], replicates: 200 }, 2000)).toEqual([]);
  });
  it("scores with a level shift or a slow rise are not in-control scores, and say so", () => {
    const ok = { arl0: 2000, interval: [1800, 2200] as [number, number], replicates: 200 };
    const shifted = calibrationWarnings(normal(3000, 2, (i) => (i < 2000 ? 0.07 : 0.08)), ok, 2000);
    expect(shifted.some((w) => w.startsWith("the scores' first and second halves differ (Kolmogorov-Smirnov"))).toBe(true);
    const rising = calibrationWarnings(normal(3000, 3, (i) => 0.07 + 0.006 * (i / 3000)), ok, 2000);
    expect(rising.some((w) => w.startsWith("the scores drift upward (Mann-Kendall"))).toBe(true);
  });
  it("leeway calibrate prints the warnings on stderr and in --json", async () => {
    const scores = normal(1500, 4, (i) => (i < 750 ? 0.07 : 0.085));
    const r = await runCli(["calibrate", "-", "--test", "cusum", "--target-arl", "200", "--replicates", "40", "--json"], { stdin: "score\n" + [...scores].join("\n") + "\n" });
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain("calibrate: warning: the scores' first and second halves differ");
    expect((JSON.parse(r.stdout) as { warnings: string[] }).warnings.length).toBeGreaterThan(0);
  });
});
