import { deflateRawSync } from "node:zlib";
import { describe, expect, test } from "vitest";
import { FleetFeeder, FleetWorker, fleetStatus, openRedis, partitionKeys } from "@leeway/fleet";
import { consumed, readOutput, SMALL_ENGINE, waitFor } from "./fleet-stream.js";
import { sharedRedis } from "./redis-server.js";

const shared = sharedRedis();

/** Runs one in-process worker until every published record of the fleet is committed, then stops it gracefully. */
async function runUntilDone(prefix: string, partitions: number, total: number): Promise<void> {
  const client = openRedis(shared.server.url);
  const worker = new FleetWorker(client, { prefix, partitions, engine: SMALL_ENGINE, batch: 25, leaseMs: 1000 });
  const running = worker.run();
  try {
    await waitFor(async () => (await consumed(shared.redis, partitions, prefix)) === total, 60_000, "every record committed");
  } finally {
    worker.stop();
    await running;
    await client.quit();
  }
}

describe("dead letters and refused snapshots (common practice, no source)", () => {
  test("malformed records, wrong lengths, non-finite values and refused operator events go to the dead-letter stream with their reason; the worker keeps going", async () => {
    const prefix = "dl";
    const feeder = new FleetFeeder(shared.redis, { prefix, partitions: 2 });
    for (let i = 0; i < 80; i++) feeder.sample("ps2-de", "harbour-lane", [1 + 0.05 * Math.sin(i)]);
    feeder.raw("ps2-de", ["s", "ps2-de", "g", "harbour-lane", "v", "1,2,3,4"]);
    feeder.raw("ps2-de", ["s", "ps2-de", "g", "harbour-lane", "v", "Infinity"]);
    feeder.raw("ps2-de", ["s", "ps2-de", "g", "harbour-lane", "v", "1.0e"]);
    feeder.raw("ps2-de", ["g", "harbour-lane", "v", "1"]);
    feeder.operator("ps2-de", "harbour-lane", "acknowledge"); // nothing is latched
    feeder.raw("ps2-de", ["s", "ps2-de", "op", "start-commissioning", "n", "3"]);
    for (let i = 0; i < 20; i++) feeder.sample("ps2-de", "harbour-lane", [1]);
    const total = await feeder.flush();
    await runUntilDone(prefix, 2, total);
    const out = await readOutput(shared.redis, 2, prefix);
    expect(out.decisions.get("ps2-de")?.length).toBe(100);
    const reasons = out.dead.map((d) => d.reason);
    expect(reasons.length).toBe(6);
    expect(reasons[0]).toBe("v has 4 values; score-only mode takes 1 to 3 (live, commissioning, newest)");
    expect(reasons[1]).toBe('v[0] is not finite: "Infinity"');
    expect(reasons[2]).toBe('v[0] is not a number: "1.0e"');
    expect(reasons[3]).toBe("field s (stream id) is missing or empty");
    expect(reasons[4]).toMatch(/^DecisionEngine: acknowledge\(\) .*latched/); // the engine's own E_STATE message
    expect(reasons[5]).toBe('start-commissioning needs n, an integer >= 10, got "3"');
  });

  test("a snapshot that restore refuses is dead-lettered whole, quarantines its stream and raises one alarm; no crash loop, other streams continue", async () => {
    const prefix = "snap";
    const feeder = new FleetFeeder(shared.redis, { prefix, partitions: 1 });
    for (let i = 0; i < 30; i++) for (const s of ["ps2-de", "ps2-nde", "ps3-de"]) feeder.sample(s, "harbour-lane", [1 + 0.01 * i]);
    let total = await feeder.flush();
    await runUntilDone(prefix, 1, total);
    const keys = partitionKeys(prefix, 0);
    const good = await shared.redis.hgetBuffer(keys.snapshots, "ps2-nde");
    expect(good).not.toBeNull();
    await shared.redis.hset(keys.snapshots, "ps2-de", deflateRawSync(JSON.stringify({ kind: "leeway.policy.decision-engine", version: 1, state: { mode: "scores" } })));
    await shared.redis.hset(keys.snapshots, "ps3-de", Buffer.from("not deflate at all"));
    for (let i = 0; i < 10; i++) for (const s of ["ps2-de", "ps2-nde", "ps3-de"]) feeder.sample(s, "harbour-lane", [1]);
    total += await feeder.flush();
    await runUntilDone(prefix, 1, total);
    await runUntilDone(prefix, 1, total); // a restart reads the quarantine, not the bad bytes again
    const out = await readOutput(shared.redis, 1, prefix);
    expect(out.decisions.get("ps2-nde")?.length).toBe(40);
    expect(out.decisions.get("ps2-de")?.length).toBe(30);
    const refused = out.dead.filter((d) => d.reason.startsWith("snapshot refused"));
    expect(refused.map((d) => d.stream).sort()).toEqual(["ps2-de", "ps3-de"]);
    expect(refused.find((d) => d.stream === "ps3-de")?.reason).toMatch(/^snapshot refused: snapshot of FleetSnapshot: bytes do not inflate/);
    expect(refused.find((d) => d.stream === "ps2-de")?.reason).toBe("snapshot refused: snapshot of leeway.policy.decision-engine: state.core is missing");
    expect(out.dead.filter((d) => d.reason.startsWith("stream is quarantined")).length).toBe(20);
    const alarms = ((await shared.redis.xrange(keys.output, "-", "+")) as [string, string[]][]).filter(([, f]) => f.includes("alarm"));
    expect(alarms.length).toBe(2);
    expect(await shared.redis.hkeys(keys.quarantine)).toEqual(expect.arrayContaining(["ps2-de", "ps3-de"]));
    expect(await shared.redis.hexists(keys.snapshots, "ps2-de")).toBe(0);
    const status = await fleetStatus(shared.redis, { prefix, partitions: 1 });
    expect(status.alarmsBySite["harbour-lane"]).toEqual(["ps2-de", "ps3-de"]);
    expect(status.partitions[0]?.quarantined).toBe(2);
  });
});
