import { existsSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { DecisionEngine } from "@leeway/policy";
import { decisionLine } from "../../../packages/cli/src/decision-log.js";
import { runCli, scratchDir } from "../run-cli.js";
import { scoreCsv, scoreRows, SHORT_ENGINE } from "../streams.js";

function withConfig(dir: string, config: unknown): string {
  const path = join(dir, "pipeline.json");
  writeFileSync(path, JSON.stringify(config, null, 2));
  return path;
}

describe("leeway replay", () => {
  it("scores mode from stdin: one decision per row, exactly the engine's, with the time carried", async () => {
    const dir = scratchDir("replay");
    const config = withConfig(dir, { engine: SHORT_ENGINE });
    const n = 1500;
    const r = await runCli(["replay", "-", "--config", config, "--log", "full"], { stdin: scoreCsv(n, 3, 1.8, 900) });
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain("replay: scores mode: live score, references ref_commissioning; time column time");
    const lines = r.stdout.trimEnd().split("\n");
    expect(lines.length).toBe(n);
    // The same engine fed directly gives the same decisions, line for line.
    const engine = new DecisionEngine(SHORT_ENGINE);
    const rows = scoreRows(n, 3, 1.8, 900);
    // The CSV carries the numbers as printed by String(), which reads back exactly.
    rows.forEach((row, i) => expect(lines[i]).toBe(decisionLine(engine.observeScores(row.live, [row.ref]), i)));
    expect(lines.some((l) => !l.includes('"action":"learn"'))).toBe(true);
  });

  it("a file and the same bytes through stdin give identical output", async () => {
    const dir = scratchDir("replay-file");
    const path = join(dir, "scores.csv");
    writeFileSync(path, scoreCsv(400, 5));
    const config = withConfig(dir, { engine: SHORT_ENGINE });
    const a = await runCli(["replay", path, "--config", config]);
    const b = await runCli(["replay", "-", "--config", config], { stdin: readFileSync(path, "utf8") });
    expect(a.code).toBe(0);
    expect(a.stdout).toBe(b.stdout);
  });

  it("features mode from NDJSON vectors", async () => {
    const dir = scratchDir("replay-features");
    const config = withConfig(dir, { engine: { ...SHORT_ENGINE, hidden: 4, members: 2 } });
    const text = Array.from({ length: 300 }, (_, i) => JSON.stringify({ t: i, x: [Math.sin(i), Math.cos(i), Math.sin(2 * i), 0.5 + 0.1 * Math.cos(3 * i)] })).join("\n");
    const r = await runCli(["replay", "-", "--config", config, "--log", "full"], { stdin: text });
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain("features mode: 4 features (x[0], x[1], x[2], ...); time column t");
    expect(r.stdout.trimEnd().split("\n").length).toBe(300);
  });

  it("a malformed record stops with exit code 3 at its line and column; only the decisions before it are written", async () => {
    const good = scoreCsv(200, 7).trimEnd().split("\n");
    good.splice(151, 0, "150.5,0.07,oops"); // line 152 of the input
    const dir = scratchDir("replay-bad");
    const config = withConfig(dir, { engine: SHORT_ENGINE });
    const r = await runCli(["replay", "-", "--config", config, "--log", "full"], { stdin: good.join("\n") });
    expect(r.code).toBe(3);
    expect(r.stderr).toContain('stdin:152:12: field 3 ("ref_commissioning"): expected a number, got "oops"');
    expect(r.stderr).toContain("replay stopped after 150 decisions (last good line 151); the decisions written are incomplete");
    expect(r.stdout.trimEnd().split("\n").length).toBe(150);
  });

  it("with --out, a stopped replay leaves only decisions.log.partial and no report; report on it marks the report incomplete", async () => {
    const dir = scratchDir("replay-out-bad");
    const r = await runCli(["replay", "-", "--out", join(dir, "run")], { stdin: "score\n0.1\n0.2\nx\n" });
    expect(r.code).toBe(3);
    expect(existsSync(join(dir, "run", "decisions.log"))).toBe(false);
    expect(existsSync(join(dir, "run", "report.html"))).toBe(false);
    const partial = join(dir, "run", "decisions.log.partial");
    expect(readFileSync(partial, "utf8").trimEnd().split("\n").length).toBe(3); // the header and two decisions, no closing line
    expect(r.stderr).toContain("decisions.log.partial, which is incomplete");
    const rebuilt = await runCli(["report", partial, "--out", join(dir, "partial.html")]);
    expect(rebuilt.code, rebuilt.stderr).toBe(0);
    expect(rebuilt.stderr).toContain("did not finish");
    expect(readFileSync(join(dir, "partial.html"), "utf8")).toContain('<p class="incomplete" role="alert"><strong>Incomplete:</strong>');
    // The same log under another name: its missing closing line still marks it incomplete.
    writeFileSync(join(dir, "cut.log"), readFileSync(partial));
    const cut = await runCli(["report", join(dir, "cut.log"), "--out", join(dir, "cut.html")]);
    expect(cut.stderr).toContain("ends without its closing line");
    expect(readFileSync(join(dir, "cut.html"), "utf8")).toContain("Incomplete:");
  });

  it("an --out folder holding an earlier run is refused, or with --force replaced before the run starts (a failed run then leaves no old report)", async () => {
    const dir = scratchDir("replay-again");
    const out = join(dir, "run");
    expect((await runCli(["replay", "-", "--out", out], { stdin: scoreCsv(300, 4) })).code).toBe(0);
    expect(existsSync(join(out, "report.html"))).toBe(true);
    const again = await runCli(["replay", "-", "--out", out], { stdin: scoreCsv(300, 4) });
    expect(again.code).toBe(2);
    expect(again.stderr).toContain("already holds the output of an earlier run (decisions.log, report.html); choose another folder, or add --force to replace it");
    const failed = await runCli(["replay", "-", "--out", out, "--force"], { stdin: "score\n0.1\nx\n" });
    expect(failed.code).toBe(3);
    expect(existsSync(join(out, "report.html"))).toBe(false);
    expect(existsSync(join(out, "decisions.log"))).toBe(false);
    expect(existsSync(join(out, "decisions.log.partial"))).toBe(true);
  });

  it("a header with reference columns but no score column is refused, naming the columns and how to name the score", async () => {
    const r = await runCli(["replay", "-"], { stdin: "time,ref_commissioning\n0,0.1\n1,0.2\n" });
    expect(r.code).toBe(3);
    expect(r.stderr).toContain('columns named ref… hold reference scores, but no column holds the live score; the columns are time, ref_commissioning. Name the live score\'s column "score" or "live"');
    expect(r.stdout).toBe("");
  });

  it("an interrupted replay says so on stderr with exit code 130 and names the partial file", async () => {
    const dir = scratchDir("replay-interrupt");
    const stop = new AbortController();
    const lines = scoreCsv(3000, 8).split("\n");
    // The stream is handed over in two parts; the signal arrives between them, as a Ctrl-C would.
    const stdin = (async function* () {
      yield Buffer.from(lines.slice(0, 1500).join("\n") + "\n");
      await new Promise((ok) => setTimeout(ok, 20));
      stop.abort("SIGINT");
      yield Buffer.from(lines.slice(1500).join("\n"));
    })();
    const r = await runCli(["replay", "-", "--out", join(dir, "run")], { stdin, signal: stop.signal });
    expect(r.code).toBe(130);
    expect(r.stderr).toMatch(/replay interrupted by SIGINT after \d+ decisions \(last good line \d+\); they are in .*decisions\.log\.partial, which is incomplete/);
    expect(existsSync(join(dir, "run", "decisions.log"))).toBe(false);
  });

  it("with --out and --labels: decisions, a report with the metrics, and a printed summary", async () => {
    const dir = scratchDir("replay-out");
    const config = withConfig(dir, { engine: SHORT_ENGINE, report: { title: "PS-2 replay" } });
    writeFileSync(join(dir, "labels.json"), JSON.stringify({ events: [{ cause: "concept-drift", start: 900, end: 1500, id: "compressor" }] }));
    const r = await runCli(["replay", "-", "--config", config, "--labels", join(dir, "labels.json"), "--out", join(dir, "run")], { stdin: scoreCsv(1500, 3, 1.8, 900) });
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain("replayed 1500 samples");
    expect(r.stdout).toContain("metrics against");
    expect(r.stdout).toContain("compressor");
    expect(readFileSync(join(dir, "run", "decisions.log"), "utf8").trimEnd().split("\n").length).toBeGreaterThan(1500); // header, 1500 decisions, closing line
    const html = readFileSync(join(dir, "run", "report.html"), "utf8");
    expect(html).toContain("PS-2 replay");
    expect(html).toContain('id="plot-events"');
    expect(html).toContain("<caption>What the answers claimed (columns) against what happened (rows)</caption>");
  });

  it("a config with an unknown key or a refused value is an input error at its place", async () => {
    const dir = scratchDir("replay-config");
    const bad = join(dir, "bad.json");
    writeFileSync(bad, '{\n  "engine": {\n    "comissioning": 100\n  }\n}\n');
    const r = await runCli(["replay", "-", "--config", bad], { stdin: "score\n0.1\n" });
    expect(r.code).toBe(3);
    expect(r.stderr).toContain('bad.json:3:5: unknown key "engine.comissioning"; did you mean "engine.commissioning"?');
    writeFileSync(bad, '{"engine": {"commissioning": 3}}');
    const v = await runCli(["replay", "-", "--config", bad], { stdin: "score\n0.1\n" });
    expect(v.code).toBe(3);
    expect(v.stderr).toMatch(/bad\.json:1:13: engine\.commissioning: DecisionEngine: option commissioning must be/);
  });

  it("a sample the engine refuses (NaN under nonFinite refuse) is an input error naming line, column, field and value; under skip it is held", async () => {
    const r = await runCli(["replay", "-"], { stdin: "time,score,ref_commissioning\n0,0.1,0.1\n1,0.1,NaN\n" });
    expect(r.code).toBe(3);
    expect(r.stderr).toContain('stdin:3:7: field 3 ("ref_commissioning") = "NaN": the engine refused this value');
    expect(r.stderr).toContain("E_NON_FINITE");
    expect(r.stderr).toContain("after 1 decisions (last good line 2)");
    const nd = await runCli(["replay", "-"], { stdin: '{"t":0,"x":[0.1,0.2]}\n{"t":1,"x":[0.1,1e999]}\n' });
    expect(nd.stderr).toContain('stdin:2:8: "x[1]" = null: the engine refused this value');
    const dir = scratchDir("replay-skip");
    const config = withConfig(dir, { engine: { nonFinite: "skip" } });
    const s = await runCli(["replay", "-", "--config", config, "--log", "full"], { stdin: "score\n0.1\nNaN\n0.1\n" });
    expect(s.code, s.stderr).toBe(0);
    expect(s.stdout.trimEnd().split("\n")[1]).toContain('"action":"hold"');
  });

  it("a scripted operator acknowledges latched alarms when the config asks for one", async () => {
    const dir = scratchDir("replay-operator");
    const stream = scoreCsv(1200, 11, 30, 700);
    const without = await runCli(["replay", "-", "--log", "full", "--config", withConfig(dir, { engine: SHORT_ENGINE })], { stdin: stream });
    const withOp = await runCli(["replay", "-", "--log", "full", "--config", withConfig(dir, { engine: SHORT_ENGINE, operator: { acknowledgeAfter: 20 } })], { stdin: stream });
    const latched = (text: string): number => text.split("\n").filter((l) => l.includes('"phase":"latched"')).length;
    expect(latched(without.stdout)).toBeGreaterThan(0);
    expect(latched(withOp.stdout)).toBeLessThan(latched(without.stdout));
  });

  it("draws a progress bar on stderr only when stderr is a terminal", async () => {
    const dir = scratchDir("replay-progress");
    const path = join(dir, "scores.csv");
    writeFileSync(path, scoreCsv(3000, 2));
    const tty = await runCli(["replay", path], { tty: true });
    expect(tty.stderr).toMatch(/\rreplay \[#*-*\] +\d+% \d/);
    expect(tty.stderr).toContain("\r\u001b[K");
    const pipe = await runCli(["replay", path]);
    expect(pipe.stderr).not.toContain("\r");
    expect(tty.stdout).toBe(pipe.stdout);
  });

  it("with input.modeColumn each record goes to the engine of its mode: the same decisions as one engine per mode alone", async () => {
    const dir = scratchDir("replay-modes");
    const config = withConfig(dir, { engine: SHORT_ENGINE, input: { modeColumn: "speed" } });
    const rows = scoreRows(1200, 21);
    const speed = (i: number): string => (Math.floor(i / 100) % 2 === 0 ? "low" : "high");
    const csv = "speed,score\n" + rows.map((r, i) => `${speed(i)},${r.live}`).join("\n") + "\n";
    const r = await runCli(["replay", "-", "--config", config, "--log", "full"], { stdin: csv });
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toContain("one engine per value of speed");
    const lines = r.stdout.trimEnd().split("\n").map((l) => JSON.parse(l) as { index: number; action: string; cause: string; evidence: { mode: string; liveScore: number } });
    const engines = new Map<string, DecisionEngine>();
    rows.forEach((row, i) => {
      const mode = speed(i);
      if (!engines.has(mode)) engines.set(mode, new DecisionEngine(SHORT_ENGINE));
      const d = engines.get(mode)!.observeScores(row.live);
      expect([lines[i]!.index, lines[i]!.action, lines[i]!.cause, lines[i]!.evidence.mode]).toEqual([i, d.action, d.cause, mode]);
    });
  });
});
