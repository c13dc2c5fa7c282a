import { describe, expect, it } from "vitest";
import { helpText, parseArguments, type CommandSpec } from "../../packages/cli/src/args.js";
import { UsageError } from "../../packages/cli/src/exit-codes.js";

const spec: CommandSpec = {
  name: "try",
  summary: "A command for the tests.",
  positionals: [{ name: "file", description: "input" }],
  flags: [
    { name: "scale", kind: "number", value: "S", description: "samples per hour", defaultText: "60" },
    { name: "out", kind: "string", value: "DIR", description: "output" },
    { name: "json", kind: "boolean", description: "JSON output" },
    { name: "test", kind: "string", value: "NAME", description: "which", choices: ["cusum", "ewma"] },
  ],
};

function usage(argv: string[]): UsageError {
  try {
    parseArguments(spec, argv);
  } catch (error) {
    expect(error).toBeInstanceOf(UsageError);
    expect((error as UsageError).exitCode).toBe(2);
    return error as UsageError;
  }
  throw new Error(`expected a usage error for ${argv.join(" ")}`);
}

describe("parseArguments", () => {
  it("reads --name value, --name=value, booleans and positionals in any order", () => {
    const p = parseArguments(spec, ["--scale", "0.5", "in.csv", "--out=run", "--json"]);
    expect(p.positionals).toEqual(["in.csv"]);
    expect(p.flags.get("scale")).toBe(0.5);
    expect(p.flags.get("out")).toBe("run");
    expect(p.flags.get("json")).toBe(true);
    expect(p.help).toBe(false);
  });
  it('takes "-" as a positional (standard input) and everything after -- as positional', () => {
    expect(parseArguments(spec, ["-"]).positionals).toEqual(["-"]);
    expect(parseArguments(spec, ["--", "--json"]).positionals).toEqual(["--json"]);
  });
  it("accepts a negative number as a flag value", () => {
    expect(parseArguments(spec, ["x", "--scale", "-2"]).flags.get("scale")).toBe(-2);
  });
  it("--help needs no positionals", () => {
    expect(parseArguments(spec, ["--help"]).help).toBe(true);
    expect(parseArguments(spec, ["-h"]).help).toBe(true);
  });
  it("an unknown flag is a usage error that suggests the nearest flag", () => {
    expect(usage(["x", "--scal", "2"]).message).toContain("unknown flag --scal; did you mean --scale?");
    expect(usage(["x", "--colour"]).message).not.toContain("did you mean");
  });
  it("a missing value, a malformed number, a repeated flag, a bad choice and a value for a boolean are usage errors", () => {
    expect(usage(["x", "--scale"]).message).toContain("--scale needs a value");
    expect(usage(["x", "--scale", "fast"]).message).toContain('--scale must be a number, got "fast"');
    expect(usage(["x", "--scale", ""]).message).toContain("must be a number");
    expect(usage(["x", "--out", "a", "--out", "b"]).message).toContain("given twice");
    expect(usage(["x", "--test", "cusm"]).message).toContain("did you mean cusum?");
    expect(usage(["x", "--json=yes"]).message).toContain("takes no value");
    expect(usage(["x", "-j"]).message).toContain("unknown option -j");
  });
  it("missing and surplus positionals are usage errors naming the argument", () => {
    expect(usage([]).message).toContain("missing argument <file>");
    expect(usage(["a", "b"]).message).toContain('unexpected argument "b"');
  });
});

describe("helpText", () => {
  it("lists the usage line, every flag with its placeholder and default, and --help", () => {
    const text = helpText(spec);
    expect(text.split("\n")[0]).toBe("leeway try <file> [flags]");
    for (const f of spec.flags) expect(text).toContain(`--${f.name}`);
    expect(text).toContain("--scale S");
    expect(text).toContain("(default 60)");
    expect(text).toContain("-h, --help");
  });
});
