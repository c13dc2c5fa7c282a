import { randomInt } from "node:crypto";
import { writeFileSync, mkdirSync } from "node:fs";
import { it } from "vitest";
import { PROBE_CLASSES, census, takesSamples } from "../test/fuzz/laws.js";
import { FUZZ_SUBJECTS } from "../test/fuzz/subjects/index.js";
import { operatorCensus } from "./engine-operator-census.js";

// Counts the verdicts of every probe class of the fuzz suite per component
// (tried / refused / accepted / accepted wrongly / crashed) over more probes
// than npm test runs, then runs the operator census of the decision engine
// (random host calls whatever the phase; see engine-operator-census.ts).
// LEEWAY_CENSUS_RUNS sets the probes per class (default 200; engines get a
// fifth), LEEWAY_CENSUS_SEED the seed (default 1; "fresh" draws one and prints
// it, to hunt for new counterexamples). Writes bench/results/fuzz-census.json.
const runs = Number(process.env.LEEWAY_CENSUS_RUNS ?? 200);
const seedText = process.env.LEEWAY_CENSUS_SEED ?? "1";
const seed = seedText === "fresh" ? randomInt(2 ** 31 - 1) : Number(seedText);
if (!Number.isSafeInteger(seed) || !(runs >= 1)) throw new Error(`LEEWAY_CENSUS_SEED must be an integer or "fresh" and LEEWAY_CENSUS_RUNS ≥ 1, got ${seedText} and ${runs}`);

it("fuzz census: verdicts per component and probe class", () => {
  console.log(`fuzz census: seed ${seed}${seedText === "fresh" ? " (fresh)" : ""}, ${runs} probes per class; replay with LEEWAY_CENSUS_SEED=${seed} LEEWAY_CENSUS_RUNS=${runs} npm run bench -- bench/fuzz-census.bench.ts`);
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
  const operators: Record<string, unknown>[] = [];
  for (const mode of ["scores", "features"] as const) {
    const t = operatorCensus(mode, runs, seed);
    operators.push({ engine: mode, ...t });
    console.log(`DecisionEngine (${mode}) operator calls: ${t.probes} streams, ${t.decisions} decisions, calls taken ${t.callsTaken}, refused ${t.callsRefused}; invalid decisions ${t.invalidDecisions}, unexpected errors ${t.unexpectedErrors}, refused but changed ${t.refusedButChanged}${t.examples.length > 0 ? `\n    e.g. ${t.examples[0]}` : ""}`);
  }
  mkdirSync("bench/results", { recursive: true });
  writeFileSync("bench/results/fuzz-census.json", `${JSON.stringify({ runs, seed, rows, operators }, null, 1)}\n`);
});
