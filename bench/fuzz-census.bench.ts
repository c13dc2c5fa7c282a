import { writeFileSync, mkdirSync } from "node:fs";
import { it } from "vitest";
import { PROBE_CLASSES, census, takesSamples } from "../test/fuzz/laws.js";
import { FUZZ_SUBJECTS } from "../test/fuzz/subjects/index.js";

// Counts the verdicts of every probe class of the fuzz suite per component
// (tried / refused / accepted / accepted wrongly / crashed) over more probes
// than npm test runs. LEEWAY_CENSUS_RUNS sets the probes per class (default
// 200), LEEWAY_CENSUS_SEED the seed (default 1). Writes bench/results/fuzz-census.json.
const runs = Number(process.env.LEEWAY_CENSUS_RUNS ?? 200);
const seed = Number(process.env.LEEWAY_CENSUS_SEED ?? 1);

it("fuzz census: verdicts per component and probe class", () => {
  const rows: Record<string, unknown>[] = [];
  for (const subject of FUZZ_SUBJECTS) {
    for (const kind of PROBE_CLASSES) {
      if ((kind === "bad-sample" || kind === "extreme") && !takesSamples(subject)) continue;
      const n = subject.name.startsWith("DecisionEngine") ? Math.max(10, Math.round(runs / 5)) : runs;
      const { census: c, examples } = census(subject, kind, n, seed);
      rows.push({ component: subject.name, probe: kind, tried: n, ...c, examples });
      console.log(`${subject.name.padEnd(26)} ${kind.padEnd(10)} tried ${String(n).padStart(5)}  refused ${String(c.refused).padStart(5)}  accepted ${String(c.accepted).padStart(5)}  wrong ${String(c.wrong).padStart(4)}  crashed ${String(c.crashed).padStart(4)}${examples.length > 0 ? `\n    e.g. ${examples[0]?.slice(0, 300)}` : ""}`);
    }
  }
  mkdirSync("bench/results", { recursive: true });
  writeFileSync("bench/results/fuzz-census.json", `${JSON.stringify({ runs, seed, rows }, null, 1)}\n`);
});
