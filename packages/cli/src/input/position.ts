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
