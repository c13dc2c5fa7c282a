import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { Cusum } from "@leeway/change";
import { RandomSource } from "@leeway/core";
import { runCli, scratchDir } from "../run-cli.js";

function normalScores(n: number, seed: number): string {
  const rng = new RandomSource(seed);
  return "score\n" + Array.from({ length: n }, () => String(0.07 + 0.01 * rng.normal())).join("\n") + "\n";
}

interface Calibration {
  test: string;
  threshold: number;
  arl0: number;
  interval: [number, number];
  mean: number;
  sigma: number;
  scores: number;
}

async function calibrate(args: string[], scores: string): Promise<Calibration> {
  const r = await runCli(["calibrate", "-", ...args, "--json"], { stdin: scores });
  expect(r.code, r.stderr).toBe(0);
  return JSON.parse(r.stdout) as Calibration;
}

describe("leeway calibrate", () => {
  const scores = normalScores(2000, 1);

  it("finds a CUSUM h whose own run lengths on fresh normal data average near the target", async () => {
    const c = await calibrate(["--test", "cusum", "--target-arl", "300", "--replicates", "60"], scores);
    expect(c.scores).toBe(2000);
    expect(c.interval[0]).toBeLessThan(c.arl0);
    expect(c.interval[1]).toBeGreaterThan(c.arl0);
    // Independent check: run the calibrated test on new normal samples (not the bootstrap) and average its run lengths.
    const rng = new RandomSource(99);
    let total = 0;
    const runs = 200;
    for (let r = 0; r < runs; r++) {
      const test = new Cusum({ k: 0.5, h: c.threshold, mean: c.mean, sigma: c.sigma });
      let n = 0;
      while (n < 30000) {
        n++;
        if (test.observe(0.07 + 0.01 * rng.normal()).status === "change") break;
      }
      total += n;
    }
    const arl = total / runs;
    expect(arl).toBeGreaterThan(300 * 0.6);
    expect(arl).toBeLessThan(300 * 1.6);
  });

  it("a higher target gives a higher threshold, for every test", async () => {
    for (const test of ["cusum", "page-hinkley", "ewma", "adwin", "ks"]) {
      const low = await calibrate(["--test", test, "--target-arl", "150", "--replicates", "20"], scores);
      const high = await calibrate(["--test", test, "--target-arl", "1500", "--replicates", "20"], scores);
      expect(high.threshold, test).toBeGreaterThan(low.threshold);
    }
  });

  it("prints the threshold and the ARL0 with its interval as text", async () => {
    const dir = scratchDir("calibrate");
    const path = join(dir, "commissioning.csv");
    writeFileSync(path, scores);
    const r = await runCli(["calibrate", path, "--test", "ewma", "--target-arl", "200", "--replicates", "20"]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/^test {8}EWMA chart, λ = 0\.2, two-sided/);
    expect(r.stdout).toMatch(/\nthreshold {3}\d/);
    expect(r.stdout).toMatch(/\nARL0 {8}\S+ samples \(95 % interval \S+ to \S+; target 200\)/);
  });

  it("refuses too few scores, a constant stream and a missing --test", async () => {
    expect((await runCli(["calibrate", "-", "--test", "cusum", "--target-arl", "100"], { stdin: "score\n1\n2\n" })).stderr).toContain("at least 10 scores");
    const constant = await runCli(["calibrate", "-", "--test", "cusum", "--target-arl", "100"], { stdin: "score\n" + "1\n".repeat(20) });
    expect(constant.code).toBe(3);
    expect(constant.stderr).toContain("all equal");
    expect((await runCli(["calibrate", "-", "--target-arl", "100"], { stdin: scores })).code).toBe(2);
  });
});
