import { UsageError } from "./exit-codes.js";
import { suggestion } from "./nearest.js";

/** One `--flag` of a subcommand. */
export interface FlagSpec {
  /** Long name without the dashes, e.g. `"target-arl"`. */
  name: string;
  /** `"string"` and `"number"` take a value (`--x v` or `--x=v`); `"boolean"` takes none. */
  kind: "string" | "number" | "boolean";
  /** Placeholder shown in help, e.g. `"DIR"`. */
  value?: string;
  /** One line of help. */
  description: string;
  /** The default, as shown in help (the command applies it). */
  defaultText?: string;
  /** Values allowed (checked here), for enumerations. */
  choices?: readonly string[];
}

/** A positional argument of a subcommand. */
export interface PositionalSpec {
  name: string;
  description: string;
  optional?: boolean;
}

/** Everything the parser and the help text need to know about a subcommand. */
export interface CommandSpec {
  name: string;
  summary: string;
  positionals: readonly PositionalSpec[];
  flags: readonly FlagSpec[];
  /** Paragraphs printed after the flags in `--help`. */
  details?: readonly string[];
  /** Example command lines printed last in `--help`. */
  examples?: readonly string[];
}

/** What {@link parseArguments} returns. */
export interface ParsedArguments {
  positionals: string[];
  flags: Map<string, string | number | boolean>;
  help: boolean;
}

/**
 * Parses the arguments after the subcommand name: `--name value`,
 * `--name=value`, boolean `--name`, `-h`/`--help`, `--` (everything after it
 * is positional) and `-` (a positional meaning standard input). Unknown flags,
 * missing values, malformed numbers and a wrong number of positionals are
 * {@link UsageError}s; an unknown flag's message suggests the nearest one.
 * @example
 * parseArguments(demoSpec, ["--scale", "0.5"]).flags.get("scale"); // 0.5
 */
export function parseArguments(spec: CommandSpec, argv: readonly string[]): ParsedArguments {
  const positionals: string[] = [];
  const flags = new Map<string, string | number | boolean>();
  let help = false;
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i] as string;
    if (arg === "--") {
      positionals.push(...argv.slice(i + 1));
      break;
    }
    if (arg === "-h" || arg === "--help") {
      help = true;
      continue;
    }
    if (!arg.startsWith("-") || arg === "-") {
      positionals.push(arg);
      continue;
    }
    if (!arg.startsWith("--")) throw new UsageError(`${spec.name}: unknown option ${arg}; options are written --name (see leeway ${spec.name} --help)`);
    const equals = arg.indexOf("=");
    const name = arg.slice(2, equals < 0 ? undefined : equals);
    const flag = spec.flags.find((f) => f.name === name);
    if (flag === undefined) {
      const near = suggestion(name, spec.flags.map((f) => f.name).concat("help"), (s) => `--${s}`);
      throw new UsageError(`${spec.name}: unknown flag --${name}${near} (see leeway ${spec.name} --help)`);
    }
    if (flags.has(name)) throw new UsageError(`${spec.name}: flag --${name} is given twice`);
    if (flag.kind === "boolean") {
      if (equals >= 0) throw new UsageError(`${spec.name}: flag --${name} takes no value`);
      flags.set(name, true);
      continue;
    }
    let text: string;
    if (equals >= 0) text = arg.slice(equals + 1);
    else {
      const next = argv[i + 1];
      if (next === undefined || (next.startsWith("--") && next.length > 2)) throw new UsageError(`${spec.name}: flag --${name} needs a value (${flag.value ?? flag.kind})`);
      text = next;
      i++;
    }
    flags.set(name, flagValue(spec.name, flag, text));
  }
  if (!help) checkPositionals(spec, positionals);
  return { positionals, flags, help };
}

function flagValue(command: string, flag: FlagSpec, text: string): string | number {
  if (flag.choices !== undefined && !flag.choices.includes(text)) {
    throw new UsageError(`${command}: flag --${flag.name} must be one of ${flag.choices.join(", ")}, got ${JSON.stringify(text)}${suggestion(text, flag.choices)}`);
  }
  if (flag.kind === "string") {
    if (text.length === 0) throw new UsageError(`${command}: flag --${flag.name} needs a non-empty value`);
    return text;
  }
  const value = text.trim() === "" ? NaN : Number(text);
  if (!Number.isFinite(value)) throw new UsageError(`${command}: flag --${flag.name} must be a number, got ${JSON.stringify(text)}`);
  return value;
}

function checkPositionals(spec: CommandSpec, positionals: readonly string[]): void {
  const required = spec.positionals.filter((p) => p.optional !== true).length;
  if (positionals.length < required) {
    const missing = spec.positionals[positionals.length] as PositionalSpec;
    throw new UsageError(`${spec.name}: missing argument <${missing.name}> (see leeway ${spec.name} --help)`);
  }
  if (positionals.length > spec.positionals.length) {
    throw new UsageError(`${spec.name}: unexpected argument ${JSON.stringify(positionals[spec.positionals.length])} (see leeway ${spec.name} --help)`);
  }
}

/** A flag's value as a string, or the fallback. */
export function stringFlag(parsed: ParsedArguments, name: string): string | undefined {
  const value = parsed.flags.get(name);
  return typeof value === "string" ? value : undefined;
}

/** A flag's value as a number, or undefined. */
export function numberFlag(parsed: ParsedArguments, name: string): number | undefined {
  const value = parsed.flags.get(name);
  return typeof value === "number" ? value : undefined;
}

/** The `--help` text of a subcommand, generated from its spec. */
export function helpText(spec: CommandSpec): string {
  const usage = [`leeway ${spec.name}`, ...spec.positionals.map((p) => (p.optional === true ? `[${p.name}]` : `<${p.name}>`)), ...(spec.flags.length > 0 ? ["[flags]"] : [])].join(" ");
  const lines = [`${usage}`, "", spec.summary, ""];
  if (spec.positionals.length > 0) {
    lines.push("Arguments:");
    for (const p of spec.positionals) lines.push(`  ${p.name.padEnd(22)} ${p.description}`);
    lines.push("");
  }
  lines.push("Flags:");
  for (const f of spec.flags) {
    const left = `--${f.name}${f.kind === "boolean" ? "" : ` ${f.value ?? f.kind.toUpperCase()}`}`;
    const tail = f.defaultText === undefined ? "" : ` (default ${f.defaultText})`;
    lines.push(`  ${left.padEnd(22)} ${f.description}${tail}`);
  }
  lines.push(`  ${"-h, --help".padEnd(22)} print this help`);
  for (const paragraph of spec.details ?? []) lines.push("", paragraph);
  if (spec.examples !== undefined && spec.examples.length > 0) {
    lines.push("", "Examples:");
    for (const e of spec.examples) lines.push(`  ${e}`);
  }
  return lines.join("\n") + "\n";
}
