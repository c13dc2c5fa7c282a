import { LeewayError } from "@leeway/core";
import { helpText, parseArguments, type CommandSpec, type ParsedArguments } from "./args.js";
import { calibrateSpec, runCalibrate } from "./commands/calibrate.js";
import { demoSpec, runDemo } from "./commands/demo.js";
import { fleetSpec, runFleet } from "./commands/fleet.js";
import { qualitySpec, runQuality } from "./commands/quality.js";
import { replaySpec, runReplay } from "./commands/replay.js";
import { reportSpec, runReport } from "./commands/report.js";
import { CliError, EXIT_INPUT, EXIT_INTERNAL, EXIT_OK, EXIT_USAGE } from "./exit-codes.js";
import type { CliStreams } from "./io.js";
import { suggestion } from "./nearest.js";
import { SAFETY_CAUTION } from "./report/safety.js";
import { leewayVersion } from "./version.js";

interface Command {
  spec: CommandSpec;
  run(parsed: ParsedArguments, io: CliStreams): Promise<number>;
  /** A command with actions of its own parses its arguments itself. */
  dispatch?(argv: readonly string[], io: CliStreams): Promise<number>;
}

const COMMANDS: readonly Command[] = [
  { spec: demoSpec, run: runDemo },
  { spec: replaySpec, run: runReplay },
  { spec: calibrateSpec, run: runCalibrate },
  { spec: reportSpec, run: runReport },
  { spec: fleetSpec, run: () => Promise.resolve(EXIT_USAGE), dispatch: runFleet },
  { spec: qualitySpec, run: runQuality },
];

/** The top-level `leeway --help`. */
export function mainHelp(): string {
  const lines = [
    "leeway — decide, on streams of anomaly scores, when a model should retrain and when someone must be told.",
    "",
    "Usage: leeway <command> [arguments] [flags]",
    "",
    "Commands:",
    ...COMMANDS.map((c) => `  ${c.spec.name.padEnd(11)} ${c.spec.summary}`),
    "",
    "Flags:",
    "  --version   print the version",
    "  -h, --help  print this help; leeway <command> --help for a command's own",
    "",
    "Exit codes: 0 success, 2 usage error, 3 input error, 4 internal error.",
    "",
    SAFETY_CAUTION,
  ];
  return lines.join("\n") + "\n";
}

/**
 * Runs the `leeway` command with the given arguments (without `node` and the
 * script path) and streams, and returns its exit code: 0 success, 2 usage
 * error, 3 input error, 4 internal error. Nothing here calls `process.exit`,
 * so a host or a test can run it in-process.
 * @example
 * const code = await main(["--version"], { stdin: process.stdin, stdout: process.stdout, stderr: process.stderr, stderrIsTTY: false, cwd: process.cwd() });
 * // prints "0.1.0"; code === 0
 */
export async function main(argv: readonly string[], io: CliStreams): Promise<number> {
  try {
    const [first, ...rest] = argv;
    if (first === undefined || first === "-h" || first === "--help" || first === "help") {
      if (first === "help" && rest[0] !== undefined) return await main([rest[0], "--help"], io);
      io.stdout.write(mainHelp());
      return first === undefined ? EXIT_USAGE : EXIT_OK;
    }
    if (first === "--version" || first === "-v") {
      io.stdout.write(`${leewayVersion()}\n`);
      return EXIT_OK;
    }
    const command = COMMANDS.find((c) => c.spec.name === first);
    if (command === undefined) {
      const names = COMMANDS.map((c) => c.spec.name);
      const flag = first.startsWith("-");
      const what = flag ? `unknown flag ${first}${suggestion(first.replace(/^-+/, ""), ["version", "help"], (s) => `--${s}`)}` : `unknown command ${JSON.stringify(first)}${suggestion(first, names)}`;
      io.stderr.write(`leeway: ${what} (commands: ${names.join(", ")}; see leeway --help)\n`);
      return EXIT_USAGE;
    }
    if (command.dispatch !== undefined) return await command.dispatch(rest, io);
    const parsed = parseArguments(command.spec, rest);
    if (parsed.help) {
      io.stdout.write(helpText(command.spec));
      return EXIT_OK;
    }
    return await command.run(parsed, io);
  } catch (error) {
    return reportError(error, io);
  }
}

function reportError(error: unknown, io: CliStreams): number {
  if (error instanceof CliError) {
    io.stderr.write(`leeway: ${error.message}\n`);
    return error.exitCode;
  }
  if (error instanceof LeewayError) {
    // A component refused an option or a sample that came from the input.
    io.stderr.write(`leeway: ${error.message} [${error.code}]\n`);
    return EXIT_INPUT;
  }
  const e = error instanceof Error ? error : new Error(String(error));
  const system = e as NodeJS.ErrnoException;
  if (system.code === "EPIPE") return EXIT_OK;
  if (typeof system.syscall === "string") {
    // The operating system refused a read or a write (a vanished file, a full disk).
    io.stderr.write(`leeway: ${e.message}\n`);
    return EXIT_INPUT;
  }
  io.stderr.write(`leeway: internal error: ${e.message}\n${e.stack ?? ""}\nThis is a fault in leeway; please report it with the command line that caused it.\n`);
  return EXIT_INTERNAL;
}

export { EXIT_OK, EXIT_USAGE, EXIT_INPUT, EXIT_INTERNAL };
