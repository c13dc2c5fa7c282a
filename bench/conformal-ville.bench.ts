import { mkdirSync, writeFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { it } from "vitest";
import { RandomSource } from "@leeway/core";
import { ConformalMartingale, type ConformalBetting } from "@leeway/change";

// The long check of Ville's bound for ConformalMartingale (the test suite runs 250 streams of 2000
// samples per law): 2000 i.i.d. streams of 10 000 tested samples per law and betting, λ = 20 and 100.
const LAWS: Record<string, (r: RandomSource) => number> = {
  normal: (r) => r.normal(),
  exponential: (r) => r.exponential(1),
  "log-normal σ=1.5": (r) => Math.exp(r.normal(0, 1.5)),
  "Poisson(2)": (r) => {
    let k = 0;
    for (let t = r.exponential(1); t < 2; t += r.exponential(1)) k++;
    return k;
  },
};

it("ConformalMartingale: probability of ever alarming on i.i.d. streams against Ville's bound 1/λ", () => {
  const runs = 2000;
  const horizon = 10_000;
  const rows: { law: string; betting: ConformalBetting; threshold: number; alarms: number; runs: number; probability: number; standardError: number; bound: number }[] = [];
  const xs = new Float64Array(horizon + 100);
  for (const [law, draw] of Object.entries(LAWS)) {
    for (const betting of ["jumper", "power", "mixture"] as const) {
      const rng = new RandomSource(`ville-long-${law}-${betting}`);
      const alarms = new Map<number, number>([[20, 0], [100, 0]]);
      for (let r = 0; r < runs; r++) {
        for (let i = 0; i < xs.length; i++) xs[i] = draw(rng);
        // one pass per stream: λ = 100 alarms only where λ = 20 has
        const test = new ConformalMartingale({ threshold: 20, betting, seed: `${law}-${betting}-${r}` });
        if (test.scan(xs) < 0) continue;
        alarms.set(20, (alarms.get(20) as number) + 1);
        const high = new ConformalMartingale({ threshold: 100, betting, seed: `${law}-${betting}-${r}` });
        if (high.scan(xs) >= 0) alarms.set(100, (alarms.get(100) as number) + 1);
      }
      for (const [threshold, count] of alarms) {
        const probability = count / runs;
        const standardError = Math.sqrt((probability * (1 - probability)) / runs);
        rows.push({ law, betting, threshold, alarms: count, runs, probability, standardError, bound: 1 / threshold });
        console.log(`${law.padEnd(18)} ${betting.padEnd(8)} λ=${String(threshold).padEnd(4)} P(alarm within ${horizon}) = ${probability.toFixed(4)} ± ${standardError.toFixed(4)} (bound ${(1 / threshold).toFixed(3)})`);
      }
    }
  }
  const dir = fileURLToPath(new URL("./results/", import.meta.url));
  mkdirSync(dir, { recursive: true });
  writeFileSync(`${dir}conformal-ville.json`, JSON.stringify(rows, null, 2) + "\n");
});
