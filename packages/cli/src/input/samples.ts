import { InputError } from "../exit-codes.js";
import { csvFieldColumn, isNaNWord, parseNumberCell, splitCsvLine } from "./csv.js";
import type { LineBatch } from "./lines.js";
import { parseJsonLine, recordError, showCell } from "./position.js";

/** How the columns of a stream are read. */
export type StreamMode = "scores" | "features";

/**
 * What a stream's header (CSV) or first record (NDJSON) says about its columns.
 * In `"scores"` mode `values[0]` of a row is the live score and the rest are
 * reference scores, in the order of `referenceColumns`; in `"features"` mode
 * `values` is the feature vector, in the order of `featureColumns`.
 */
export interface StreamLayout {
  format: "csv" | "ndjson";
  mode: StreamMode;
  /** The column carried through as time, or null. */
  timeColumn: string | null;
  /** The column naming each record's operating mode (config `input.modeColumn`), or null. */
  modeColumn: string | null;
  /** Scores mode: the live score's column. */
  liveColumn: string | null;
  /** Scores mode: the reference scores' columns. */
  referenceColumns: string[];
  /** Features mode: the feature columns (an NDJSON array field `x` gives `x[0]`, `x[1]`, ...). */
  featureColumns: string[];
  /** Columns present but not used (not numeric, or beside `score`/`live`). */
  ignoredColumns: string[];
  /** True when the CSV had no header row (every field of the first line was a number). */
  headerless: boolean;
}

/** One record of the stream. */
export interface SampleRow {
  /** 1-based line number in the input. */
  line: number;
  /** The time column's value, or null. */
  time: string | number | null;
  /** The mode column's value as text, or null. */
  mode: string | null;
  /** Scores mode: [live, ...references]; features mode: the feature vector. */
  values: Float64Array;
  /** The record as read (for placing an error at a value's column). */
  text: string;
}

/** A batch of rows with the layout they follow. */
export interface SampleBatch {
  layout: StreamLayout;
  rows: SampleRow[];
  bytesRead: number;
  /**
   * The place of value `j` of a row, for an error about it: `name:line:column: field k ("score") = "NaN"`
   * (CSV) or `name:line:column: "x[3]" = null` (NDJSON).
   */
  place(row: SampleRow, j: number): string;
}

/**
 * Most columns a record may have (a CSV header's fields, or an NDJSON record's
 * keys and array elements together). Checked before any per-column work, so a
 * huge header is refused at once.
 */
export const MAX_COLUMNS = 65_536;

/** Options of {@link readSamples}. */
export interface ReadSamplesOptions {
  /** Name of the input in error messages. */
  name: string;
  /** `"auto"` (default) infers the mode from the columns. */
  mode?: "auto" | StreamMode;
  /** The time column's name; `undefined` looks for time, timestamp, datetime, date or t; null means none. */
  timeColumn?: string | null;
  /** Only these columns (features mode, or the live column in scores mode); default every numeric column. */
  columns?: readonly string[];
  /** A column naming each record's operating mode (not a feature); default none. */
  modeColumn?: string;
}

const TIME_NAMES = ["time", "timestamp", "datetime", "date", "t"];

/**
 * Reads samples from CSV (a header row; or none when the first line is all
 * numbers) or NDJSON (one JSON object per line; detected by a leading `{`),
 * streaming batch by batch in constant memory. Blank lines and lines starting
 * with `#` are skipped. Columns: a single numeric column, or columns named
 * `score`/`live` and `ref…`, mean scores mode; otherwise every numeric column
 * is a feature. Malformed records stop the stream with an {@link InputError}
 * naming line, column and what was expected.
 */
export async function* readSamples(lines: AsyncIterable<LineBatch>, options: ReadSamplesOptions): AsyncGenerator<SampleBatch> {
  const name = options.name;
  let parser: RowParser | null = null;
  let header: { names: string[]; line: number; format: "csv" | "ndjson"; headerless: boolean } | null = null;
  for await (const batch of lines) {
    const rows: SampleRow[] = [];
    for (let k = 0; k < batch.lines.length; k++) {
      const text = batch.lines[k] as string;
      const line = batch.firstLine + k;
      if (text.length === 0 || text.charCodeAt(0) === 35 /* # */ || text.trim().length === 0) continue;
      if (header === null) {
        header = readHeader(text, line, name);
        if (!header.headerless) continue;
      }
      if (parser === null) parser = makeParser(header, text, line, options);
      try {
        rows.push(parser.parse(text, line));
      } catch (error) {
        // The records before a malformed one are good: hand them over, then stop.
        if (rows.length > 0) yield { layout: parser.layout, rows, bytesRead: batch.bytesRead, place: parser.place };
        throw error;
      }
    }
    if (parser !== null && rows.length > 0) yield { layout: parser.layout, rows, bytesRead: batch.bytesRead, place: parser.place };
  }
  if (header === null) throw new InputError(`${name}: the input is empty; expected a CSV header row or NDJSON records`);
  if (parser === null) throw new InputError(`${name}: the input has a header (line ${header.line}) but no records`);
}

function readHeader(text: string, line: number, name: string): { names: string[]; line: number; format: "csv" | "ndjson"; headerless: boolean } {
  const lead = text.trimStart()[0];
  if (lead === "{" || lead === "[") return { names: [], line, format: "ndjson", headerless: true };
  const fields = splitCsvLine(text, name, line);
  if (fields.length > MAX_COLUMNS) throw recordError(name, line, 1, `the header has ${fields.length} fields; at most ${MAX_COLUMNS} columns are read`);
  const headerless = fields.every((f) => !Number.isNaN(parseNumberCell(f)) || isNaNWord(f));
  if (headerless) return { names: fields.map((_, i) => `column${i + 1}`), line, format: "csv", headerless };
  const names = fields.map((f) => f.trim());
  const seen = new Set<string>();
  names.forEach((n, i) => {
    if (n.length === 0) throw recordError(name, line, csvFieldColumn(text, i), `header field ${i + 1} is empty; expected a column name`);
    if (seen.has(n)) throw recordError(name, line, csvFieldColumn(text, i), `column name ${JSON.stringify(n)} appears twice; expected unique names`);
    seen.add(n);
  });
  return { names, line, format: "csv", headerless };
}

interface RowParser {
  layout: StreamLayout;
  parse(text: string, line: number): SampleRow;
  place(row: SampleRow, j: number): string;
}

/** Chooses the layout from the column names and the first record's values (linear in the number of columns). */
function chooseLayout(
  format: "csv" | "ndjson",
  names: readonly string[],
  isNumeric: (column: string) => boolean,
  options: ReadSamplesOptions,
  headerless: boolean,
): StreamLayout {
  const where = options.name;
  const all = new Set(names);
  const listed = (): string => (names.length <= 12 ? names.join(", ") : `${names.slice(0, 10).join(", ")}, ... (${names.length} columns)`);
  let timeColumn: string | null = null;
  if (options.timeColumn === undefined) timeColumn = names.find((n) => TIME_NAMES.includes(n.toLowerCase())) ?? null;
  else if (options.timeColumn !== null) {
    if (!all.has(options.timeColumn)) throw new InputError(`${where}: the time column ${JSON.stringify(options.timeColumn)} is not among the columns (${listed()})`);
    timeColumn = options.timeColumn;
  }
  const modeColumn = options.modeColumn ?? null;
  if (modeColumn !== null && !all.has(modeColumn)) throw new InputError(`${where}: the mode column ${JSON.stringify(modeColumn)} is not among the columns (${listed()})`);
  const rest = names.filter((n) => n !== timeColumn && n !== modeColumn);
  const restSet = new Set(rest);
  if (options.columns !== undefined) {
    for (const c of options.columns) if (!restSet.has(c)) throw new InputError(`${where}: the column ${JSON.stringify(c)} named in the config is not among the columns (${listed()})`);
  }
  const mode = options.mode ?? "auto";
  const live = rest.find((n) => n.toLowerCase() === "score" || n.toLowerCase() === "live") ?? null;
  if (mode !== "features" && live !== null && options.columns === undefined) {
    const referenceColumns = rest.filter((n) => n !== live && /^ref/i.test(n));
    for (const c of [live, ...referenceColumns]) if (!isNumeric(c)) throw new InputError(`${where}: the first record's ${JSON.stringify(c)} is not a number; expected numeric scores`);
    const used = new Set([live, ...referenceColumns]);
    return layout(format, "scores", timeColumn, modeColumn, live, referenceColumns, [], rest.filter((n) => !used.has(n)), headerless);
  }
  if (mode === "auto" && options.columns === undefined && rest.some((n) => /^ref/i.test(n))) {
    // Reference scores without a live score: reading a reference as the live score would decide on the wrong model.
    throw new InputError(`${where}: columns named ref… hold reference scores, but no column holds the live score; the columns are ${listed()}. Name the live score's column "score" or "live", or choose the columns with input.columns (and input.mode) in the config`);
  }
  const chosen = options.columns ?? rest;
  const numeric = chosen.filter(isNumeric);
  const numericSet = new Set(numeric);
  const ignored = rest.filter((n) => !numericSet.has(n));
  if (options.columns !== undefined && numeric.length < chosen.length) {
    const bad = chosen.find((c) => !isNumeric(c)) as string;
    throw new InputError(`${where}: the column ${JSON.stringify(bad)} named in the config is not numeric in the first record`);
  }
  if (numeric.length === 0) throw new InputError(`${where}: no numeric column found in the first record (columns ${listed()}); expected scores or features`);
  if (mode === "scores" || (mode === "auto" && numeric.length === 1)) {
    if (numeric.length > 1) throw new InputError(`${where}: scores mode needs one column or columns named score/live and ref…; got ${numeric.length} numeric columns (${numeric.slice(0, 5).join(", ")}${numeric.length > 5 ? ", ..." : ""})`);
    return layout(format, "scores", timeColumn, modeColumn, numeric[0] as string, [], [], ignored, headerless);
  }
  return layout(format, "features", timeColumn, modeColumn, null, [], numeric, ignored, headerless);
}

function layout(
  format: "csv" | "ndjson",
  mode: StreamMode,
  timeColumn: string | null,
  modeColumn: string | null,
  liveColumn: string | null,
  referenceColumns: string[],
  featureColumns: string[],
  ignoredColumns: string[],
  headerless: boolean,
): StreamLayout {
  return { format, mode, timeColumn, modeColumn, liveColumn, referenceColumns, featureColumns, ignoredColumns, headerless };
}

function usedColumns(l: StreamLayout): string[] {
  return l.mode === "scores" ? [l.liveColumn as string, ...l.referenceColumns] : l.featureColumns;
}

function makeParser(
  header: { names: string[]; format: "csv" | "ndjson"; headerless: boolean },
  firstText: string,
  firstLine: number,
  options: ReadSamplesOptions,
): RowParser {
  return header.format === "csv" ? csvParser(header.names, header.headerless, firstText, firstLine, options) : ndjsonParser(firstText, firstLine, options);
}

function csvParser(names: string[], headerless: boolean, firstText: string, firstLine: number, options: ReadSamplesOptions): RowParser {
  const name = options.name;
  const first = splitCsvLine(firstText, name, firstLine);
  const position = new Map<string, number>();
  names.forEach((n, i) => position.set(n, i));
  const indexOf = (column: string): number => position.get(column) ?? -1;
  const isNumeric = (column: string): boolean => {
    const cell = first[indexOf(column)];
    return cell !== undefined && (!Number.isNaN(parseNumberCell(cell)) || isNaNWord(cell));
  };
  const chosen = chooseLayout("csv", names, isNumeric, options, headerless);
  const indices = Int32Array.from(usedColumns(chosen), indexOf);
  const timeIndex = chosen.timeColumn === null ? -1 : indexOf(chosen.timeColumn);
  const modeIndex = chosen.modeColumn === null ? -1 : indexOf(chosen.modeColumn);
  const width = names.length;
  return {
    layout: chosen,
    place(row: SampleRow, j: number): string {
      const field = indices[j] as number;
      const cell = splitCsvLine(row.text, name, row.line)[field] ?? "";
      return `${name}:${row.line}:${csvFieldColumn(row.text, field)}: field ${field + 1} (${JSON.stringify(names[field])}) = ${showCell(cell)}`;
    },
    parse(text: string, line: number): SampleRow {
      const fields = splitCsvLine(text, name, line);
      if (fields.length !== width) {
        const column = fields.length > width ? csvFieldColumn(text, width) : text.length + 1;
        throw recordError(name, line, column, `expected ${width} fields (${names.length <= 6 ? names.join(", ") : `${names.slice(0, 5).join(", ")}, ...`}), got ${fields.length}`);
      }
      const values = new Float64Array(indices.length);
      for (let j = 0; j < indices.length; j++) {
        const field = indices[j] as number;
        const cell = fields[field] as string;
        const v = parseNumberCell(cell);
        if (v !== v && !isNaNWord(cell)) throw recordError(name, line, csvFieldColumn(text, field), `field ${field + 1} (${JSON.stringify(names[field])}): expected a number, got ${showCell(cell)}`);
        values[j] = v;
      }
      let time: string | number | null = null;
      if (timeIndex >= 0) {
        const cell = (fields[timeIndex] as string).trim();
        const t = parseNumberCell(cell);
        time = Number.isNaN(t) ? cell : t;
      }
      let mode: string | null = null;
      if (modeIndex >= 0) {
        mode = (fields[modeIndex] as string).trim();
        if (mode.length === 0) throw recordError(name, line, csvFieldColumn(text, modeIndex), `field ${modeIndex + 1} (${JSON.stringify(names[modeIndex])}): expected the name of an operating mode, got an empty field`);
      }
      return { line, time, mode, values, text };
    },
  };
}

function parseJsonRecord(text: string, name: string, line: number): Record<string, unknown> {
  const value = parseJsonLine(text, name, line, "one JSON object per line");
  if (typeof value !== "object" || value === null || Array.isArray(value)) throw recordError(name, line, 1, "expected a JSON object (NDJSON records are objects)");
  return value as Record<string, unknown>;
}

function keyColumn(text: string, key: string): number {
  const at = text.indexOf(JSON.stringify(key));
  return at < 0 ? 1 : at + 1;
}

function ndjsonParser(firstText: string, firstLine: number, options: ReadSamplesOptions): RowParser {
  const name = options.name;
  const first = parseJsonRecord(firstText, name, firstLine);
  // Scalar keys are columns; an array of numbers under key k becomes columns k[0], k[1], ...
  const names: string[] = [];
  const vectors = new Map<string, number>();
  const entries = Object.entries(first);
  let width = 0;
  for (const [, value] of entries) width += Array.isArray(value) ? value.length : 1;
  if (width > MAX_COLUMNS) throw recordError(name, firstLine, 1, `the record has ${width} values (keys and array elements); at most ${MAX_COLUMNS} columns are read`);
  // Each column is read as record[key] or record[key][i].
  const source = new Map<string, { key: string; index: number; column: string }>();
  for (const [key, value] of entries) {
    if (Array.isArray(value)) {
      vectors.set(key, value.length);
      for (let i = 0; i < value.length; i++) {
        const column = `${key}[${i}]`;
        names.push(column);
        source.set(column, { key, index: i, column });
      }
    } else {
      names.push(key);
      source.set(key, { key, index: -1, column: key });
    }
  }
  const isNumeric = (column: string): boolean => {
    const s = source.get(column);
    const v = s === undefined ? undefined : s.index < 0 ? first[s.key] : (first[s.key] as unknown[])[s.index];
    return typeof v === "number";
  };
  const chosen = chooseLayout("ndjson", names, isNumeric, options, false);
  const reads = usedColumns(chosen).map((column) => source.get(column) as { key: string; index: number; column: string });
  const timeColumn = chosen.timeColumn;
  const modeColumn = chosen.modeColumn;
  return {
    layout: chosen,
    place(row: SampleRow, j: number): string {
      const r = reads[j] as { key: string; index: number; column: string };
      const record = parseJsonRecord(row.text, name, row.line);
      const v = r.index < 0 ? record[r.key] : (record[r.key] as unknown[])[r.index];
      return `${name}:${row.line}:${keyColumn(row.text, r.key)}: "${r.column}" = ${JSON.stringify(v) ?? "no such key"}`;
    },
    parse(text: string, line: number): SampleRow {
      const record = parseJsonRecord(text, name, line);
      const values = new Float64Array(reads.length);
      for (let j = 0; j < reads.length; j++) {
        const r = reads[j] as { key: string; index: number; column: string };
        let v = record[r.key];
        if (r.index >= 0) {
          if (!Array.isArray(v) || v.length !== vectors.get(r.key)) {
            throw recordError(name, line, keyColumn(text, r.key), `"${r.key}": expected an array of ${vectors.get(r.key)} numbers, got ${Array.isArray(v) ? `${v.length} elements` : v === undefined ? "no such key" : typeof v}`);
          }
          v = v[r.index];
        }
        if (typeof v !== "number") {
          throw recordError(name, line, v === undefined && r.index < 0 ? 1 : keyColumn(text, r.key), `"${r.column}": expected a number, got ${v === undefined ? "no such key" : JSON.stringify(v)}`);
        }
        values[j] = v;
      }
      let time: string | number | null = null;
      if (timeColumn !== null) {
        const t = record[timeColumn];
        if (typeof t !== "string" && typeof t !== "number") throw recordError(name, line, keyColumn(text, timeColumn), `"${timeColumn}": expected a time (a number or a string), got ${t === undefined ? "no such key" : JSON.stringify(t)}`);
        time = t;
      }
      let mode: string | null = null;
      if (modeColumn !== null) {
        const m = record[modeColumn];
        if ((typeof m !== "string" || m.length === 0) && typeof m !== "number") throw recordError(name, line, keyColumn(text, modeColumn), `"${modeColumn}": expected the name of an operating mode, got ${m === undefined ? "no such key" : JSON.stringify(m)}`);
        mode = String(m);
      }
      return { line, time, mode, values, text };
    },
  };
}
