import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { createReadStream } from "node:fs";
import { readDecisionLog, type DecisionLogInfo, type LoggedDecision } from "../../../packages/cli/src/decision-log.js";
import { readLines } from "../../../packages/cli/src/input/lines.js";
import { demoEngineOptions, simulatedClock } from "../../../packages/cli/src/commands/demo.js";
import { runCli, scratchDir } from "../run-cli.js";

async function readLog(path: string): Promise<{ decisions: LoggedDecision[]; info: DecisionLogInfo }> {
  const info: DecisionLogInfo = { format: null, complete: null };
  const decisions: LoggedDecision[] = [];
  for await (const batch of readDecisionLog(readLines(createReadStream(path), { name: path }), path, info)) decisions.push(...batch);
  return { decisions, info };
}

describe("leeway demo", () => {
  it("runs the Harbour Lane scenario end to end and writes report, decisions and labels", async () => {
    const dir = scratchDir("demo");
    const r = await runCli(["demo", "--scale", "6", "--out", dir]);
    expect(r.code, r.stderr).toBe(0);
    // 168 simulated hours at 6 samples an hour.
    expect(r.stdout).toMatch(/^Harbour Lane PS-2 — 1008 samples in /);
    for (const text of ["standby compressor installed", "outer-race defect", "rag in the impeller", "metrics:", "detected / missed"]) expect(r.stdout).toContain(text);
    const logged = await readLog(join(dir, "decisions.log"));
    expect(logged.info).toEqual({ format: "compact", complete: true });
    expect(logged.decisions.map((d) => d.decision.index)).toEqual(Array.from({ length: 1008 }, (_, i) => i));
    const labels = JSON.parse(readFileSync(join(dir, "labels.json"), "utf8")) as { events: { type: string; start: number }[]; anomaly: number[] };
    expect(labels.events.map((e) => e.type)).toEqual(["environment-shift", "degradation", "fault"]);
    expect(labels.anomaly.length).toBe(1008);
    const html = readFileSync(join(dir, "report.html"), "utf8");
    expect(html).toContain("Harbour Lane pump station, skid PS-2");
    expect(html).toContain('id="plot-events"');
  });

  it("leeway report rebuilds the demo's plots and metrics exactly from the full log and labels.json, and from the compact log to the log's rounding", async () => {
    const dir = scratchDir("demo-rebuild");
    expect((await runCli(["demo", "--scale", "6", "--out", dir, "--log", "full"])).code).toBe(0);
    const rebuilt = join(dir, "rebuilt.html");
    const r = await runCli(["report", join(dir, "decisions.ndjson"), "--labels", join(dir, "labels.json"), "--out", rebuilt]);
    expect(r.code, r.stderr).toBe(0);
    const section = (html: string, from: string, to: string): string => html.slice(html.indexOf(from), html.indexOf(to));
    const a = readFileSync(join(dir, "report.html"), "utf8");
    const b = readFileSync(rebuilt, "utf8");
    expect(section(b, '<section aria-label="plots">', "<h2>Metrics</h2>")).toBe(section(a, '<section aria-label="plots">', "<h2>Metrics</h2>"));
    expect(section(b, "<h2>Metrics</h2>", "</main>")).toBe(section(a, "<h2>Metrics</h2>", "</main>"));
    // The compact log of the same run gives the same decisions, and the metrics computed from them.
    const compactDir = scratchDir("demo-rebuild-compact");
    expect((await runCli(["demo", "--scale", "6", "--out", compactDir])).code).toBe(0);
    const c = await runCli(["report", join(compactDir, "decisions.log"), "--labels", join(compactDir, "labels.json"), "--out", join(compactDir, "rebuilt.html")]);
    expect(c.code, c.stderr).toBe(0);
    const full = await readLog(join(dir, "decisions.ndjson"));
    const compact = await readLog(join(compactDir, "decisions.log"));
    expect(compact.decisions.map((d) => [d.decision.action, d.decision.cause, d.decision.phase])).toEqual(full.decisions.map((d) => [d.decision.action, d.decision.cause, d.decision.phase]));
    const metrics = (html: string): string => section(html, "<h2>Metrics</h2>", "<h2>Decision changes</h2>");
    expect(metrics(readFileSync(join(compactDir, "rebuilt.html"), "utf8"))).toBe(metrics(a));
  });

  it("the same seed gives the same decisions", async () => {
    const a = scratchDir("demo-a");
    const b = scratchDir("demo-b");
    await runCli(["demo", "--scale", "3", "--out", a]);
    await runCli(["demo", "--scale", "3", "--out", b]);
    expect(readFileSync(join(a, "decisions.log"), "utf8")).toBe(readFileSync(join(b, "decisions.log"), "utf8"));
    expect(readFileSync(join(a, "report.html"), "utf8")).toBe(readFileSync(join(b, "report.html"), "utf8"));
  });

  it("engine spans follow the scale: the policy guide's settings at scale 360, floors below", () => {
    const o = demoEngineOptions(360, 256, "s");
    expect(o).toMatchObject({ commissioning: 120, calibration: 120, settling: 90, settlingLimit: 360, trendBlock: 6, coolDown: 180, baselineHalfLife: 180, targetArl0: 2000, retrainHorizon: 8640, hidden: 16, members: 3 });
    expect(demoEngineOptions(720, 256, "s").commissioning).toBe(240);
    expect(demoEngineOptions(6, 256, "s").commissioning).toBe(40);
  });

  it("each speed setting has its own engine, named in every decision", async () => {
    const dir = scratchDir("demo-modes");
    expect((await runCli(["demo", "--scale", "12", "--out", dir])).code).toBe(0);
    const modes = new Set((await readLog(join(dir, "decisions.log"))).decisions.map((d) => d.decision.evidence.mode));
    expect([...modes].sort()).toEqual(["high", "low", "mid"]);
  });

  it("simulated clock: sample i at s samples per hour", () => {
    expect(simulatedClock(0, 60)).toBe("day 1 00:00");
    expect(simulatedClock(34 * 60 + 5, 60)).toBe("day 2 10:05"); // the compressor: day 2, 10:00 (hour 34)
  });
});
