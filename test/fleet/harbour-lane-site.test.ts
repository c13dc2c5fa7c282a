import { describe, expect, test } from "vitest";
import { DEGRADATION_AT, DEGRADING, PUMPS, pumpId, replaySiteDemo, runSiteDemo, SHIFT_AT, simulatePumps, siteFigures } from "./harbour-lane-site.js";

// The twenty-pump demonstration (invented Harbour Lane scenario, see harbour-lane-site.ts): the fleet's batch
// step and its site evidence in process, on the simulator's spectra. Seeded: the same figures every run.
const pumps = simulatePumps();
const told = runSiteDemo(pumps, true);
const untold = runSiteDemo(pumps, false);

describe("site-wide evidence on twenty simulated pumps (common practice, no source)", () => {
  test("the site shift is absorbed on the shifted pumps with at most 5 anomaly pages (19 without site evidence); every healthy pump is told once and retrains", () => {
    const withSite = siteFigures(told);
    const without = siteFigures(untold);
    // At most the pumps that page before a fifth of the site (4 of 20) has reacted, and one whose page is in flight.
    expect(withSite.anomalyPages).toBeLessThanOrEqual(5);
    expect(without.anomalyPages).toBeGreaterThanOrEqual(15);
    expect(withSite.told).toBe(PUMPS - 1);
    expect(withSite.absorbed).toBeGreaterThanOrEqual(17);
    expect(without.absorbed).toBe(0); // nobody acknowledges in this demonstration: latched pumps stay latched
    for (let k = 0; k < PUMPS; k++) expect(told.told.get(pumpId(k))?.length ?? 0).toBeLessThanOrEqual(1);
    expect(told.dead).toEqual([]);
  });

  test("the degrading pump raises a degradation alarm, is not told of the site shift and learns nothing from its first degradation evidence on", () => {
    const f = siteFigures(told);
    expect(f.degradationEvidenceAt).toBeGreaterThan(DEGRADATION_AT);
    expect(f.degradationAlarmAt).toBeGreaterThanOrEqual(f.degradationEvidenceAt);
    expect(f.degradingTold).toBe(0);
    expect(f.degradingLearnt).toBe(0);
    const decisions = told.decisions.get(pumpId(DEGRADING)) ?? [];
    expect(decisions.filter((d) => d.index >= SHIFT_AT && (d.action === "retrain" || d.evidence.siteShift !== undefined))).toEqual([]);
  });

  test("the site-shift events travel in the input log: new owners replaying the log (one killed between checkpoints) write the same output byte for byte", () => {
    const events = told.log.filter(([, f]) => f.includes("site-shift"));
    expect(events).toHaveLength(PUMPS - 1);
    expect(JSON.stringify(replaySiteDemo(told.log, 120, 100))).toBe(JSON.stringify(told.outputs));
  });
});
