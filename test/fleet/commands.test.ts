import { describe, expect, test } from "vitest";
import { FleetWorker, openRedis } from "@leeway/fleet";
import { runCli } from "../cli/run-cli.js";
import { consumed, SMALL_ENGINE, waitFor } from "./fleet-stream.js";
import { sharedRedis } from "./redis-server.js";

const shared = sharedRedis();

describe("leeway fleet feed and status", () => {
  test("feed publishes a CSV of interleaved pumps (site from the stream id); status shows owners, lag and open alarms per site", async () => {
    const rows = ["stream,score,t"];
    for (let i = 0; i < 200; i++) for (const s of ["harbour-lane/ps2-de", "harbour-lane/ps2-nde", "quay-street/ps1-de"]) rows.push(`${s},${(i > 150 && s.endsWith("ps2-de") ? 30 : 1) * (1 + 0.05 * Math.sin(i))},${i}`);
    const fed = await runCli(["fleet", "feed", "--redis", shared.server.url, "--partitions", "4", "-"], { stdin: rows.join("\n") + "\n" });
    expect(fed.code).toBe(0);
    expect(fed.stderr).toContain("fleet feed: 600 records published into 4 partitions");
    const before = await runCli(["fleet", "status", "--redis", shared.server.url, "--partitions", "4", "--json"]);
    expect(JSON.parse(before.stdout).totalLag).toBe(600);
    const client = openRedis(shared.server.url);
    const worker = new FleetWorker(client, { partitions: 4, engine: SMALL_ENGINE, batch: 50, leaseMs: 1000 });
    const running = worker.run();
    await waitFor(async () => (await consumed(shared.redis, 4)) === 600, 60_000, "every record committed");
    const status = await runCli(["fleet", "status", "--redis", shared.server.url, "--partitions", "4"]);
    worker.stop();
    await running;
    await client.quit();
    expect(status.code).toBe(0);
    expect(status.stdout).toContain("total lag: 0");
    expect(status.stdout).toMatch(/harbour-lane: 1 — harbour-lane\/ps2-de/); // the pump whose scores jumped 30-fold is latched
    expect(status.stdout).toContain(worker.owner);
  });

  test("usage errors: an unknown action, a missing --partitions, a URL that is not redis://", async () => {
    expect((await runCli(["fleet", "wrker"])).stderr).toMatch(/unknown action "wrker".*worker/);
    const missing = await runCli(["fleet", "status"]);
    expect([missing.code, missing.stderr]).toEqual([2, "leeway: fleet status: flag --partitions is required (the fleet's partition count)\n"]);
    expect((await runCli(["fleet", "status", "--partitions", "2", "--redis", "http://x"])).stderr).toMatch(/--redis must be a URL like redis:\/\//);
  });
});
