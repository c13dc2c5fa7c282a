import { recordError } from "./position.js";

/**
 * Splits one CSV line into its fields (RFC 4180 quoting within a line: a
 * field in double quotes may hold commas, and `""` inside it is one quote).
 * A line without quotes takes a fast path (`String.split`). A quoted field
 * that does not close on its line is an input error: records span one line.
 * @example
 * splitCsvLine('time,"pump, drive end",score', "a.csv", 1); // ["time", "pump, drive end", "score"]
 */
export function splitCsvLine(text: string, name: string, line: number): string[] {
  if (!text.includes('"')) return text.split(",");
  const fields: string[] = [];
  let i = 0;
  for (;;) {
    if (text[i] === '"') {
      const start = i;
      let value = "";
      i++;
      for (;;) {
        const close = text.indexOf('"', i);
        if (close < 0) throw recordError(name, line, start + 1, "a quoted field does not close on this line; expected a closing \" (records may not span lines)");
        value += text.slice(i, close);
        if (text[close + 1] === '"') {
          value += '"';
          i = close + 2;
          continue;
        }
        i = close + 1;
        break;
      }
      fields.push(value);
      if (i === text.length) return fields;
      if (text[i] !== ",") throw recordError(name, line, i + 1, `expected a comma after a quoted field, got ${JSON.stringify(text[i])}`);
      i++;
    } else {
      const comma = text.indexOf(",", i);
      const end = comma < 0 ? text.length : comma;
      const value = text.slice(i, end);
      if (value.includes('"')) throw recordError(name, line, i + 1 + value.indexOf('"'), "a double quote inside an unquoted field; expected the whole field in quotes");
      fields.push(value);
      if (comma < 0) return fields;
      i = comma + 1;
    }
  }
}

/**
 * The 1-based character column where field `field` (0-based) of a CSV line
 * starts, for error messages (recomputed only when an error is reported).
 */
export function csvFieldColumn(text: string, field: number): number {
  let quoted = false;
  let seen = 0;
  for (let i = 0; i < text.length; i++) {
    if (seen === field) return i + 1;
    const c = text[i];
    if (c === '"') quoted = !quoted;
    else if (c === "," && !quoted) {
      seen++;
      if (seen === field) return i + 2;
    }
  }
  return text.length + 1;
}

/**
 * A number from a text cell, or NaN when the cell is not a decimal number.
 * Accepts what JSON and most spreadsheets write (`-1.5`, `2e-3`, `.5`,
 * surrounding spaces) and the words `NaN`, `Infinity`, `-Infinity` (a
 * non-finite sample is then the pipeline's to refuse or skip); refuses empty
 * cells and hexadecimal, octal or binary notation.
 * @example
 * parseNumberCell(" 0.25 "); // 0.25
 * parseNumberCell("n/a"); // NaN
 */
export function parseNumberCell(text: string): number {
  const value = +text; // Number(text): decimal, exponent, Infinity, surrounding white space
  if (value !== value) return NaN;
  let i = 0;
  while (i < text.length && text.charCodeAt(i) <= 32) i++;
  if (i === text.length) return NaN; // "" and "  " are 0 to Number()
  let c = text.charCodeAt(i);
  if (c === 43 || c === 45) c = text.charCodeAt(++i); // + or -
  if (c === 48 && i + 1 < text.length) {
    const next = text.charCodeAt(i + 1) | 32; // lower case
    if (next === 120 || next === 111 || next === 98) return NaN; // 0x, 0o, 0b
  }
  return value;
}

/** True when `text` spells NaN (which {@link parseNumberCell} cannot tell apart from "not a number"). */
export function isNaNWord(text: string): boolean {
  const t = text.trim();
  return t === "NaN" || t === "nan";
}
