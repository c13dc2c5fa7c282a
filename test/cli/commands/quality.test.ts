import { execFileSync } from "node:child_process";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { runCli, scratchDir } from "../run-cli.js";

const ONE = "fault/10 min/clog 10 min/1";

describe("leeway quality", () => {
  it("runs the chosen scenarios in this thread and writes the document with its tables, targets and a linked SVG plot", async () => {
    const dir = scratchDir("quality");
    const out = join(dir, "quality.md");
    const run = await runCli(["quality", "--only", ONE, "--workers", "0", "--out", out, "--title", "one fault"]);
    expect(run.code).toBe(0);
    expect(run.stdout).toMatch(/^quality: 1 scenarios, \d+ samples in \d+ s; targets met \d+ of \d+; wrote /);
    const md = readFileSync(out, "utf8");
    expect(md.split("\n")[0]).toBe("# Decision quality: one fault");
    expect(md).toContain("## Abrupt faults");
    expect(md).toContain("](quality.svg)");
    expect(md).toContain("| fault-alarmed-within-5 |");
    const svg = readFileSync(join(dir, "quality.svg"), "utf8");
    expect(svg.startsWith("<svg")).toBe(true);
    expect(svg).toContain("fault, engine, operator, 10 min");
  });

  it("refuses a filter that matches nothing and a bad worker count", async () => {
    const none = await runCli(["quality", "--only", "no such scenario", "--workers", "0"]);
    expect(none.code).toBe(2);
    expect(none.stderr).toContain("no scenario id contains");
    const bad = await runCli(["quality", "--workers", "9"]);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toContain("--workers");
  });

  it("the built command runs scenarios on a worker thread", () => {
    const dir = scratchDir("quality-worker");
    const out = join(dir, "q.md");
    const bin = join(process.cwd(), "packages/cli/bin/leeway.js");
    const stdout = execFileSync(process.execPath, [bin, "quality", "--only", ONE, "--workers", "1", "--out", out], { encoding: "utf8" });
    expect(stdout).toContain("quality: 1 scenarios");
    expect(readFileSync(out, "utf8")).toContain("| 10 min | engine, unattended | 1 | 1 |");
  });
});
