import { mkdirSync, writeFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { it } from "vitest";
import { DEGRADING, pumpId, runSiteDemo, simulatePumps, siteFigures, type SiteFigures } from "../test/fleet/harbour-lane-site.js";

// The twenty-pump Harbour Lane demonstration of site-wide evidence (test/fleet/harbour-lane-site.ts), with
// and without the site evidence; prints the table of docs/fleet.md and writes bench/results/site-shift-demo.json.
it("site-wide evidence on twenty simulated pumps: figures", () => {
  const pumps = simulatePumps();
  const started = process.cpuUsage();
  const wall = performance.now();
  const withSite = siteFigures(runSiteDemo(pumps, true));
  const without = siteFigures(runSiteDemo(pumps, false));
  const cpu = process.cpuUsage(started);
  const rows: [string, (f: SiteFigures) => number | string][] = [
    ["anomaly pages on the 19 healthy pumps from the shift on", (f) => f.anomalyPages],
    ["healthy pumps told of the site shift", (f) => f.told],
    ["… of them told before their own first reaction", (f) => f.toldAhead],
    ["healthy pumps that retrained (or switched) after the shift", (f) => f.absorbed],
    ["median samples from a pump's shift to its retrain", (f) => (f.medianDelay < 0 ? "—" : f.medianDelay)],
    [`${pumpId(DEGRADING)} (degrading): first degradation evidence, first degradation alarm`, (f) => `${f.degradationEvidenceAt}, ${f.degradationAlarmAt}`],
    [`${pumpId(DEGRADING)}: site-shift events received`, (f) => f.degradingTold],
    [`${pumpId(DEGRADING)}: samples learnt or retrains from its first degradation evidence on`, (f) => f.degradingLearnt],
  ];
  const table = ["| figure | with site evidence | without |", "|---|---|---|", ...rows.map(([name, get]) => `| ${name} | ${get(withSite)} | ${get(without)} |`)].join("\n");
  console.log(`${table}\n\n(both runs: ${((performance.now() - wall) / 1000).toFixed(1)} s wall, ${((cpu.user + cpu.system) / 1e6).toFixed(1)} s CPU)`);
  const dir = fileURLToPath(new URL("./results/", import.meta.url));
  mkdirSync(dir, { recursive: true });
  writeFileSync(`${dir}site-shift-demo.json`, JSON.stringify({ withSite, without }, null, 2) + "\n");
});
