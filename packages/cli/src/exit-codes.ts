/**
 * The exit codes of the `leeway` command. Scripts may rely on them; they never
 * change meaning between versions.
 *
 * | code | meaning |
 * |---|---|
 * | 0 | success |
 * | 2 | usage error: unknown subcommand or flag, a missing or malformed argument |
 * | 3 | input error: a file that cannot be read, malformed CSV/NDJSON/JSON, an invalid config, a sample the pipeline refuses |
 * | 4 | internal error: a fault in leeway itself (please report it with the command line) |
 */
export const EXIT_OK = 0;
/** Exit code of a usage error. */
export const EXIT_USAGE = 2;
/** Exit code of an input error. */
export const EXIT_INPUT = 3;
/** Exit code of an internal error. */
export const EXIT_INTERNAL = 4;

/** An error the command reports to the user with a chosen exit code (no stack trace). */
export class CliError extends Error {
  readonly exitCode: number;
  constructor(exitCode: number, message: string) {
    super(message);
    this.name = new.target.name;
    this.exitCode = exitCode;
  }
}

/**
 * A command line the command cannot run: exit code 2.
 * @example
 * new UsageError("unknown flag --scal; did you mean --scale?").exitCode; // 2
 */
export class UsageError extends CliError {
  constructor(message: string) {
    super(EXIT_USAGE, message);
  }
}

/**
 * Input the command cannot use (a file, a config, a malformed record): exit code 3.
 * @example
 * new InputError("scores.csv:12:7: expected a number, got \"n/a\"").exitCode; // 3
 */
export class InputError extends CliError {
  constructor(message: string) {
    super(EXIT_INPUT, message);
  }
}

/**
 * A run stopped by a signal (SIGINT, SIGTERM): exit code 128 + the signal's
 * number, 130 or 143, as shells report it.
 * @example
 * new InterruptedError("SIGINT", "replay interrupted").exitCode; // 130
 */
export class InterruptedError extends CliError {
  readonly signal: string;
  constructor(signal: string, message: string) {
    super(signal === "SIGTERM" ? 143 : signal === "SIGHUP" ? 129 : 130, message);
    this.signal = signal;
  }
}
