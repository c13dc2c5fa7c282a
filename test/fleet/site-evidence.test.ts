import { describe, expect, test } from "vitest";
import { partitionKeys, partitionOf, SiteEvidence } from "@leeway/fleet";
import { sharedRedis } from "./redis-server.js";

const shared = sharedRedis();

const PARTITIONS = 4;

async function decision(stream: string, site: string, index: number, onset: boolean): Promise<void> {
  const d = { index, action: "hold", cause: onset ? "concept-drift" : "normal", phase: onset ? "settling" : "watching", evidence: { liveScore: 1, referenceScores: [1], change: { status: onset ? "change" : "stable" } } };
  await shared.redis.xadd(partitionKeys("site", partitionOf(stream, PARTITIONS)).output, "*", "s", stream, "g", site, "in", "0-1", "d", JSON.stringify(d));
}

async function siteShiftEvents(): Promise<string[]> {
  const out: string[] = [];
  for (let p = 0; p < PARTITIONS; p++) {
    for (const [, f] of (await shared.redis.xrange(partitionKeys("site", p).input, "-", "+")) as [string, string[]][]) if (f.includes("site-shift")) out.push(f[1] as string);
  }
  return out.sort();
}

describe("the site-evidence consumer on a real redis-server (common practice, no source)", () => {
  test("onsets of half the pumps of a site within the window put one site-shift event into the input of each pump of the site; a lone pump's onset and another site's stay silent; a second consumer waits for the lease", async () => {
    const evidence = new SiteEvidence(shared.redis, { prefix: "site", partitions: PARTITIONS, owner: "sites-a", fraction: 0.5, window: 50, minStreams: 3 });
    const other = new SiteEvidence(shared.redis, { prefix: "site", partitions: PARTITIONS, owner: "sites-b" });
    for (let i = 0; i < 6; i++) await decision(`harbour-lane/p${i}`, "harbour-lane", 0, false);
    for (let i = 0; i < 3; i++) await decision(`quay-street/p${i}`, "quay-street", 0, false);
    await decision("quay-street/p0", "quay-street", 100, true);
    for (let i = 0; i < 4; i++) await decision(`harbour-lane/p${i}`, "harbour-lane", 200 + 10 * i, true);
    const site = Array.from({ length: 6 }, (_, i) => `harbour-lane/p${i}`);
    expect((await evidence.round()).sort()).toEqual(site.map((s) => `harbour-lane/${s}`));
    expect(await other.round()).toEqual([]);
    expect(other.active).toBe(false);
    expect(await siteShiftEvents()).toEqual(site);
    expect(await evidence.round()).toEqual([]); // read positions moved: nothing is told twice
    expect(await siteShiftEvents()).toHaveLength(6);
  });
});
