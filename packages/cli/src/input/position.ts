import { InputError } from "../exit-codes.js";

/**
 * An input error at a place in a text stream: `name:line:column: what was
 * found; what was expected`, the form editors and terminals link to.
 * @example
 * recordError("scores.csv", 12, 7, "field 2 (\"ref1\"): expected a number, got \"n/a\"").message;
 * // 'scores.csv:12:7: field 2 ("ref1"): expected a number, got "n/a"'
 */
export function recordError(name: string, line: number, column: number, problem: string): InputError {
  return new InputError(`${name}:${line}:${column}: ${problem}`);
}

/** A short rendering of a text cell for error messages. */
export function showCell(text: string): string {
  if (text.trim().length === 0) return "an empty field";
  return JSON.stringify(text.length > 40 ? `${text.slice(0, 37)}...` : text);
}

/**
 * JSON.parse of one line of an NDJSON stream; a syntax error becomes an input
 * error at the line and the column the parser names, saying what was expected.
 */
export function parseJsonLine(text: string, name: string, line: number, expected: string): unknown {
  try {
    return JSON.parse(text);
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    const position = /position (\d+)/.exec(message);
    throw recordError(name, line, position === null ? 1 : Number(position[1]) + 1, `expected ${expected} (${message.replace(/^Unexpected/, "unexpected")})`);
  }
}
