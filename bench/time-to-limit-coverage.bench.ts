import { writeFileSync, mkdirSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { it } from "vitest";
import { simulatedCrossingCoverage } from "../test/stats/time-to-limit.simulated.js";

// The long coverage run of timeToLimit on the simulator (the test suite runs 150 streams of the
// same scenario): 1000 streams checked, the true trajectory from 200 other streams, at 90 % and 80 %.
it("timeToLimit: coverage of the crossing-time interval on the simulator", () => {
  const rows = [0.9, 0.8].map((confidence) => {
    const c = simulatedCrossingCoverage({ streams: 1000, truthStreams: 200, confidence });
    const se = Math.sqrt((c.coverage * (1 - c.coverage)) / c.estimated);
    console.log(`confidence ${confidence}: covered ${c.covered}/${c.estimated} = ${c.coverage.toFixed(3)} ± ${se.toFixed(3)} (1 s.e.), not estimated ${c.notEstimated}, limit ${c.limit.toFixed(2)} mm/s², true crossing ${c.trueCrossing}, median error ${c.medianError.toFixed(2)} samples`);
    return { confidence, ...c, standardError: se };
  });
  const dir = fileURLToPath(new URL("./results/", import.meta.url));
  mkdirSync(dir, { recursive: true });
  writeFileSync(`${dir}time-to-limit-coverage.json`, JSON.stringify(rows, null, 2) + "\n");
});
