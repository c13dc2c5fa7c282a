import { describe, expect, test } from "vitest";
import { isOnset, SiteOnsets } from "@leeway/fleet";
import { expectLeewayError } from "../support/errors.js";

function site(n: number, sites: SiteOnsets, name = "harbour-lane"): string[] {
  const streams = Array.from({ length: n }, (_, i) => `pump-${i + 1}`);
  for (const s of streams) sites.observe(s, name, 0, false);
  return streams;
}

describe("site-wide evidence (common practice, no source)", () => {
  test("the doc example: two of four pumps shifting within the window make a site-wide shift; the site is told once, ahead of the third pump's onset, but not the degrading pump", () => {
    const sites = new SiteOnsets({ fraction: 0.5, window: 100, minStreams: 2 });
    for (const s of ["p1", "p2", "p3", "p4"]) sites.observe(s, "harbour-lane", 0, false);
    expect(sites.observe("p4", "harbour-lane", 10, false, true)).toEqual([]);
    expect(sites.observe("p1", "harbour-lane", 500, true)).toEqual([]);
    expect(sites.observe("p2", "harbour-lane", 530, true)).toEqual(["p1", "p2", "p3"]);
    expect(sites.observe("p3", "harbour-lane", 560, true)).toEqual([]);
    expect(sites.observe("p4", "harbour-lane", 570, true, true)).toEqual([]); // still degrading: never told
  });

  test("a stream that stops degrading can be told again; one first seen after the shift is told at its onset within the window", () => {
    const sites = new SiteOnsets({ fraction: 0.5, window: 100, minStreams: 2 });
    for (const s of ["p1", "p2", "p3"]) sites.observe(s, "harbour-lane", 0, false);
    sites.observe("p3", "harbour-lane", 5, false, true);
    sites.observe("p3", "harbour-lane", 6, false, false);
    sites.observe("p1", "harbour-lane", 500, true);
    expect(sites.observe("p2", "harbour-lane", 510, true)).toEqual(["p1", "p2", "p3"]);
    expect(sites.observe("p9", "harbour-lane", 560, true)).toEqual(["p9"]);
    expect(sites.observe("p8", "harbour-lane", 700, true)).toEqual([]); // after the window: a new episode needs its own onsets
  });

  test("twenty pumps: a shift of eleven within the window tells each pump of the site once, from the tenth onset on; a shift of one pump alone tells nobody", () => {
    const sites = new SiteOnsets({ fraction: 0.5, window: 60 });
    const pumps = site(20, sites);
    const told: string[] = [];
    for (let k = 0; k < 9; k++) expect(sites.observe(pumps[k] as string, "harbour-lane", 1000 + 5 * k, true)).toEqual([]);
    for (let k = 9; k < 11; k++) told.push(...sites.observe(pumps[k] as string, "harbour-lane", 1000 + 5 * k, true));
    expect(told.sort()).toEqual([...pumps].sort());
    expect(sites.observe(pumps[3] as string, "harbour-lane", 1052, true)).toEqual([]); // told already in this episode
    expect(sites.observe(pumps[15] as string, "harbour-lane", 5000, true)).toEqual([]); // one machine alone: a fault candidate
    expect(sites.observe(pumps[16] as string, "harbour-lane", 5200, true)).toEqual([]);
  });

  test("onsets further apart than the window, or at another site, do not add up", () => {
    const sites = new SiteOnsets({ fraction: 0.5, window: 50, minStreams: 2 });
    const a = site(4, sites, "harbour-lane");
    const b = site(4, sites, "quay-street");
    expect(sites.observe(a[0] as string, "harbour-lane", 0, true)).toEqual([]);
    expect(sites.observe(b[0] as string, "quay-street", 10, true)).toEqual([]);
    expect(sites.observe(a[1] as string, "harbour-lane", 100, true)).toEqual([]);
    expect(sites.observe(a[2] as string, "harbour-lane", 120, true)).toEqual([a[1], a[2], a[0], a[3]]);
  });

  test("an onset is a decision whose change test fired, or an alarm; a degradation or a reminder is none", () => {
    expect(isOnset({ action: "hold", cause: "concept-drift", evidence: { liveScore: 1, referenceScores: [1], change: { status: "change" } } })).toBe(true);
    expect(isOnset({ action: "alarm", cause: "anomaly", evidence: { liveScore: 1, referenceScores: [1] } })).toBe(true);
    expect(isOnset({ action: "learn", cause: "normal", evidence: { liveScore: 1, referenceScores: [1], change: { status: "warning" } } })).toBe(false);
    // A machine's own degradation, and a reminder of an alarm already raised, are not onsets of a site-wide shift.
    expect(isOnset({ action: "alarm", cause: "degradation", evidence: { liveScore: 1, referenceScores: [1] } })).toBe(false);
    expect(isOnset({ action: "hold", cause: "degradation", evidence: { liveScore: 1, referenceScores: [1], change: { status: "change" } } })).toBe(false);
    expect(isOnset({ action: "alarm", cause: "anomaly", evidence: { liveScore: 1, referenceScores: [1], reminder: { alarmCause: "anomaly", every: 100 } } })).toBe(false);
  });

  test("options are checked", () => {
    expectLeewayError(() => new SiteOnsets({ fraction: 0 }), "E_OPTION", "fraction", "0");
    expectLeewayError(() => new SiteOnsets({ minStreams: 1 }), "E_OPTION", "minStreams");
    expectLeewayError(() => new SiteOnsets({ window: -5 }), "E_OPTION", "window", "-5");
  });
});
