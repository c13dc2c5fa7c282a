/**
 * Cells of a compact decision log row (see compact-log.ts): numbers in short
 * form, `-` for null, `t`/`f` for booleans, JSON for strings and other values.
 */

/** Significant digits a compact row keeps of a number that is not an integer. */
export const COMPACT_DIGITS = 6;

/**
 * The cell of one value: integers exactly, other numbers to six significant
 * digits, null and non-finite numbers as `-`, booleans as `t`/`f`, anything
 * else as JSON.
 * @example
 * valueCell(0.7348469228349533); // "0.734847"
 * valueCell(null); // "-"
 */
export function valueCell(v: unknown): string {
  if (typeof v === "number") {
    if (!Number.isFinite(v)) return "-";
    if (Number.isSafeInteger(v)) return String(v);
    return String(Number(v.toPrecision(COMPACT_DIGITS)));
  }
  if (v === null || v === undefined) return "-";
  if (v === true) return "t";
  if (v === false) return "f";
  return JSON.stringify(v);
}

/** The value of a cell written by {@link valueCell} (a rounded number reads back rounded). */
export function cellValue(cell: string): unknown {
  const c = cell.charCodeAt(0);
  if (cell === "-") return null;
  if (cell === "t") return true;
  if (cell === "f") return false;
  if (c === 34 /* " */ || c === 91 /* [ */ || c === 123 /* { */) return JSON.parse(cell);
  const v = Number(cell);
  if (cell.length === 0 || Number.isNaN(v)) throw new SyntaxError(`expected a number, -, t, f or JSON, got ${JSON.stringify(cell.slice(0, 40))}`);
  return v;
}

/**
 * Splits a row into its cells at commas outside JSON strings, arrays and
 * objects (a string cell may hold commas and escaped quotes).
 * @example
 * splitCells('0.2,,"a,b",[1,2]'); // ["0.2", "", "\"a,b\"", "[1,2]"]
 */
export function splitCells(text: string): string[] {
  const cells: string[] = [];
  let start = 0;
  let depth = 0;
  let inString = false;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (inString) {
      if (c === 92 /* \ */) i++;
      else if (c === 34) inString = false;
    } else if (c === 34) inString = true;
    else if (c === 91 || c === 123) depth++;
    else if (c === 93 || c === 125) depth--;
    else if (c === 44 /* , */ && depth === 0) {
      cells.push(text.slice(start, i));
      start = i + 1;
    }
  }
  cells.push(text.slice(start));
  return cells;
}

const ISO_UTC = /^(\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d)(\.\d{1,3})?Z$/;

function isoText(ms: number, fractionDigits: number): string | null {
  if (!Number.isFinite(ms) || Math.abs(ms) > 8.64e15) return null;
  const full = new Date(ms).toISOString(); // yyyy-mm-ddThh:mm:ss.sssZ
  if (full.length !== 24) return null;
  return fractionDigits === 0 ? `${full.slice(0, 19)}Z` : `${full.slice(0, 20 + fractionDigits)}Z`;
}

/**
 * The time a row is expected to carry after `previous` and the one before it
 * (`earlier`): the same step again, for numbers and for ISO 8601 UTC times
 * (`2026-03-02T10:04:00Z`, with up to three decimals); otherwise the previous
 * time. A row whose time is the predicted one leaves its time cell empty.
 */
export function predictTime(previous: string | number | null, earlier: string | number | null): string | number | null {
  if (typeof previous === "number" && typeof earlier === "number") return previous + (previous - earlier);
  if (typeof previous === "string" && typeof earlier === "string") {
    const p = ISO_UTC.exec(previous);
    const e = ISO_UTC.exec(earlier);
    if (p !== null && e !== null) {
      const pm = Date.parse(previous);
      const em = Date.parse(earlier);
      const digits = p[2] === undefined ? 0 : p[2].length - 1;
      return isoText(pm + (pm - em), digits) ?? previous;
    }
  }
  return previous;
}
