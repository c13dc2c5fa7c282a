import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { parseDecisionLine } from "../../../packages/cli/src/decision-log.js";
import { demoEngineOptions, simulatedClock } from "../../../packages/cli/src/commands/demo.js";
import { runCli, scratchDir } from "../run-cli.js";

describe("leeway demo", () => {
  it("runs the Harbour Lane scenario end to end and writes report, decisions and labels", async () => {
    const dir = scratchDir("demo");
    const r = await runCli(["demo", "--scale", "6", "--out", dir]);
    expect(r.code, r.stderr).toBe(0);
    // 168 simulated hours at 6 samples an hour.
    expect(r.stdout).toMatch(/^Harbour Lane PS-2 — 1008 samples in /);
    for (const text of ["standby compressor installed", "outer-race defect", "rag in the impeller", "metrics:", "detected / missed"]) expect(r.stdout).toContain(text);
    const lines = readFileSync(join(dir, "decisions.ndjson"), "utf8").trimEnd().split("\n");
    expect(lines.length).toBe(1008);
    expect(lines.map((l, i) => parseDecisionLine(l, "d", i + 1).decision.index)).toEqual(lines.map((_, i) => i));
    const labels = JSON.parse(readFileSync(join(dir, "labels.json"), "utf8")) as { events: { type: string; start: number }[] };
    expect(labels.events.map((e) => e.type)).toEqual(expect.arrayContaining(["environment-shift", "degradation", "fault"]));
    const html = readFileSync(join(dir, "report.html"), "utf8");
    expect(html).toContain("Harbour Lane pump station, skid PS-2");
    expect(html).toContain('id="plot-events"');
  });

  it("the same seed gives the same decisions", async () => {
    const a = scratchDir("demo-a");
    const b = scratchDir("demo-b");
    await runCli(["demo", "--scale", "3", "--out", a]);
    await runCli(["demo", "--scale", "3", "--out", b]);
    expect(readFileSync(join(a, "decisions.ndjson"), "utf8")).toBe(readFileSync(join(b, "decisions.ndjson"), "utf8"));
    expect(readFileSync(join(a, "report.html"), "utf8")).toBe(readFileSync(join(b, "report.html"), "utf8"));
  });

  it("engine spans follow the scale (a day of commissioning, hours of trend), with floors for small scales", () => {
    const o = demoEngineOptions(60, 256, "s");
    expect(o.commissioning).toBe(24 * 60);
    expect(o.retrainHorizon).toBe(24 * 60);
    expect((o.trendBlock as number) * (o.trendWindow as number)).toBe(36 * 60);
    expect(demoEngineOptions(1, 256, "s").commissioning).toBe(200);
  });

  it("simulated clock: sample i at s samples per hour", () => {
    expect(simulatedClock(0, 60)).toBe("day 0 00:00");
    expect(simulatedClock(34 * 60 + 5, 60)).toBe("day 1 10:05");
  });
});
