import { describe, expect, test } from "vitest";
import { FleetFeeder, FleetWorker, openRedis, partitionKeys, partitionOf, SiteEvidence } from "@leeway/fleet";
import type { Decision } from "@leeway/policy";
import { consumed, readOutput, SMALL_ENGINE, waitFor } from "./fleet-stream.js";
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

  test("on a worker: the site-shift events reach every engine of the site through the commit; the shifted engines settle and retrain without asking, with the event in their evidence", async () => {
    const prefix = "sitework";
    const pumps = Array.from({ length: 6 }, (_, i) => `harbour-lane/w${i}`);
    const feeder = new FleetFeeder(shared.redis, { prefix, partitions: PARTITIONS });
    const level = (t: number, k: number): number => (t >= 200 ? 4 : 1) * (1 + 0.1 * Math.sin(0.37 * t + 1.3 * k) + 0.05 * Math.sin(1.91 * t + k));
    const publish = async (from: number, to: number): Promise<number> => {
      for (let t = from; t < to; t++) pumps.forEach((pump, k) => feeder.sample(pump, "harbour-lane", [level(t, k)], t));
      return feeder.flush();
    };
    const client = openRedis(shared.server.url);
    const worker = new FleetWorker(client, { prefix, partitions: PARTITIONS, engine: SMALL_ENGINE, leaseMs: 3000, idleMs: 5, batch: 200 });
    const running = worker.run();
    const evidence = new SiteEvidence(shared.redis, { prefix, partitions: PARTITIONS, owner: "sites-w", fraction: 0.5, window: 50, minStreams: 3 });
    try {
      let total = await publish(0, 215);
      await waitFor(async () => (await consumed(shared.redis, PARTITIONS, prefix)) === total, 60_000, "the first part committed");
      expect((await evidence.round()).sort()).toEqual(pumps.map((p) => `harbour-lane/${p}`).sort());
      total += 6 + (await publish(215, 330));
      await waitFor(async () => (await consumed(shared.redis, PARTITIONS, prefix)) === total, 60_000, "the second part committed");
    } finally {
      worker.stop();
      await running;
      await client.quit();
    }
    const out = await readOutput(shared.redis, PARTITIONS, prefix);
    expect(out.dead).toEqual([]);
    let receipts = 0;
    for (let p = 0; p < PARTITIONS; p++) {
      for (const [, f] of (await shared.redis.xrange(partitionKeys(prefix, p).output, "-", "+")) as [string, string[]][]) if (f.includes("op") && f.includes("site-shift")) receipts++;
    }
    expect(receipts).toBe(6);
    for (const pump of pumps) {
      const ds = (out.decisions.get(pump) ?? []).map((d) => JSON.parse(d) as Decision);
      const told = ds.find((d) => d.evidence.siteShift !== undefined);
      expect(told?.index).toBeGreaterThan(200);
      const retrain = ds.find((d) => d.action === "retrain");
      expect((retrain?.evidence.siteShift as { outcome: string } | undefined)?.outcome).toBe("retraining without asking: the site shifted");
      expect(ds.filter((d) => d.index >= 200 && d.action === "learn")).toEqual([]);
    }
  });
});
