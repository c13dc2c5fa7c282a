import { readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { decisionLine } from "../../../packages/cli/src/decision-log.js";
import { handMadeDecisions } from "../hand-made.js";
import { runCli, scratchDir } from "../run-cli.js";

describe("leeway report", () => {
  const log = handMadeDecisions(3000).map((d) => decisionLine(d, null)).join("\n") + "\n";

  it("rebuilds the report from a decision log beside it, with labels drawn and measured", async () => {
    const dir = scratchDir("report");
    writeFileSync(join(dir, "decisions.ndjson"), log);
    writeFileSync(join(dir, "labels.json"), JSON.stringify([{ cause: "concept-drift", start: 1200, end: 1400, label: "compressor" }, { cause: "degradation", start: 2100, end: 3000, label: "bearing" }]));
    const r = await runCli(["report", join(dir, "decisions.ndjson"), "--labels", join(dir, "labels.json"), "--title", "PS-2 week 9"]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain("3000 decisions");
    const html = readFileSync(join(dir, "report.html"), "utf8");
    expect(html).toContain("PS-2 week 9");
    expect(html).toContain("compressor (concept drift)");
    expect(html).toContain("<caption>What the answers claimed (columns) against what happened (rows)</caption>");
    expect(html).toContain("<caption>Each labelled event</caption>");
  });

  it("reads the log from stdin and writes where --out says", async () => {
    const dir = scratchDir("report-stdin");
    const r = await runCli(["report", "-", "--out", join(dir, "x.html")], { stdin: log });
    expect(r.code, r.stderr).toBe(0);
    expect(readFileSync(join(dir, "x.html"), "utf8")).toContain('id="lane-1-scores"');
  });

  it("a malformed log line is an input error naming it, and no report is written", async () => {
    const dir = scratchDir("report-bad");
    const lines = log.split("\n");
    lines[10] = lines[10]!.replace('"action":"learn"', '"action":"lern"');
    writeFileSync(join(dir, "decisions.ndjson"), lines.join("\n"));
    const r = await runCli(["report", join(dir, "decisions.ndjson")]);
    expect(r.code).toBe(3);
    expect(r.stderr).toMatch(/decisions\.ndjson:11:\d+: "action": expected one of learn/);
    expect(() => readFileSync(join(dir, "report.html"))).toThrow();
  });
});
