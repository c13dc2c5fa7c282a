import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { EXIT_INPUT, EXIT_INTERNAL, EXIT_OK, EXIT_USAGE } from "../../packages/cli/src/exit-codes.js";
import { runCli } from "./run-cli.js";

const version = (JSON.parse(readFileSync(new URL("../../packages/cli/package.json", import.meta.url), "utf8")) as { version: string }).version;

describe("leeway (main)", () => {
  it("--version prints the package version", async () => {
    const r = await runCli(["--version"]);
    expect(r).toEqual({ code: EXIT_OK, stdout: `${version}\n`, stderr: "" });
  });
  it("--help lists every command, the exit codes and the safety caution; no command at all is a usage error", async () => {
    const help = await runCli(["--help"]);
    expect(help.code).toBe(EXIT_OK);
    for (const c of ["demo", "replay", "calibrate", "report"]) expect(help.stdout).toContain(`  ${c} `);
    expect(help.stdout).toContain("Exit codes: 0 success, 2 usage error, 3 input error, 4 internal error.");
    expect(help.stdout).toContain("not a safety function");
    const none = await runCli([]);
    expect(none.code).toBe(EXIT_USAGE);
    expect(none.stdout).toBe(help.stdout);
  });
  it("every command has --help with its usage line, and `help <command>` prints the same", async () => {
    for (const c of ["demo", "replay", "calibrate", "report"]) {
      const r = await runCli([c, "--help"]);
      expect(r.code).toBe(EXIT_OK);
      expect(r.stdout.startsWith(`leeway ${c}`)).toBe(true);
      expect(r.stdout).toContain("-h, --help");
      expect((await runCli(["help", c])).stdout).toBe(r.stdout);
    }
  });
  it("an unknown command or flag is a usage error (2) that suggests the nearest name", async () => {
    const r = await runCli(["replya", "x.csv"]);
    expect(r.code).toBe(EXIT_USAGE);
    expect(r.stderr).toContain('unknown command "replya"; did you mean replay?');
    const f = await runCli(["demo", "--scael", "3"]);
    expect(f.code).toBe(EXIT_USAGE);
    expect(f.stderr).toContain("unknown flag --scael; did you mean --scale?");
    expect((await runCli(["--verison"])).stderr).toContain("did you mean --version?");
    expect((await runCli(["demo", "--scale", "0"])).code).toBe(EXIT_USAGE);
    expect((await runCli(["calibrate", "s.csv", "--test", "cusum"])).stderr).toContain("--target-arl is required");
  });
  it("a file that cannot be read is an input error (3)", async () => {
    const r = await runCli(["replay", "/nonexistent/ps2.csv"]);
    expect(r.code).toBe(EXIT_INPUT);
    expect(r.stderr).toContain("/nonexistent/ps2.csv: cannot read it (ENOENT)");
  });
  it("a fault that is neither bad input nor a system error is an internal error (4) with its stack", async () => {
    const broken = {
      [Symbol.asyncIterator]() {
        return { next: async (): Promise<IteratorResult<Buffer>> => { throw new TypeError("boom"); } };
      },
    };
    const r = await runCli(["replay", "-"], { stdin: broken });
    expect(r.code).toBe(EXIT_INTERNAL);
    expect(r.stderr).toContain("leeway: internal error: boom");
    expect(r.stderr).toContain("please report it");
  });
});
