import { ACTIONS, CAUSES, PHASES, type Action, type Cause, type Decision, type Phase } from "@leeway/policy";
import { InputError } from "./exit-codes.js";
import type { LineBatch } from "./input/lines.js";
import { parseJsonLine, recordError } from "./input/position.js";
import { cellValue, predictTime, splitCells } from "./log/cells.js";
import { COMPACT_FORMAT, COMPACT_VERSION } from "./log/format.js";
import { evidenceFrom, leavesOf, type Step } from "./log/leaves.js";

/** One line of a decision log: the decision and, when the input had one, the time of its sample. */
export interface LoggedDecision {
  decision: Decision;
  time: string | number | null;
}

/**
 * One NDJSON line of a decision log: `{"index":…,"time":…,"action":…,"cause":…,"phase":…,"evidence":{…}}`
 * (`time` only when the input had a time column). Non-finite evidence numbers
 * are written as null, as JSON has no NaN.
 * @example
 * decisionLine({ index: 0, action: "learn", cause: "commissioning", phase: "commissioning", evidence: { liveScore: 0.2, referenceScores: [] } }, null);
 * // '{"index":0,"action":"learn","cause":"commissioning","phase":"commissioning","evidence":{"liveScore":0.2,"referenceScores":[]}}'
 */
export function decisionLine(decision: Decision, time: string | number | null): string {
  const head = time === null ? `{"index":${decision.index}` : `{"index":${decision.index},"time":${JSON.stringify(time)}`;
  return `${head},"action":"${decision.action}","cause":"${decision.cause}","phase":"${decision.phase}","evidence":${JSON.stringify(decision.evidence)}}`;
}

function oneOf<T extends string>(value: unknown, allowed: readonly T[], name: string, line: number, column: number, field: string): T {
  if (typeof value !== "string" || !allowed.includes(value as T)) {
    throw recordError(name, line, column, `"${field}": expected one of ${allowed.join(", ")}, got ${JSON.stringify(value) ?? "no such key"}`);
  }
  return value as T;
}

/**
 * Parses one line of a decision log, checking the vocabulary (action, cause,
 * phase), the index and the two evidence fields every decision carries.
 * A null score (a non-finite number written out) reads back as NaN.
 */
export function parseDecisionLine(text: string, name: string, line: number): LoggedDecision {
  const raw = parseJsonLine(text, name, line, "a decision as one JSON object per line");
  return checkedDecision(raw, text, name, line);
}

/** Checks a parsed decision object (a full line, or a compact row rebuilt) and returns it as a decision. */
function checkedDecision(raw: unknown, text: string, name: string, line: number): LoggedDecision {
  if (typeof raw !== "object" || raw === null || Array.isArray(raw)) throw recordError(name, line, 1, "expected a decision object {index, action, cause, phase, evidence}");
  const r = raw as Record<string, unknown>;
  const col = (key: string): number => Math.max(1, text.indexOf(`"${key}"`) + 1);
  if (typeof r.index !== "number" || !Number.isInteger(r.index) || r.index < 0) throw recordError(name, line, col("index"), `"index": expected an integer >= 0, got ${JSON.stringify(r.index) ?? "no such key"}`);
  const action: Action = oneOf(r.action, ACTIONS, name, line, col("action"), "action");
  const cause: Cause = oneOf(r.cause, CAUSES, name, line, col("cause"), "cause");
  const phase: Phase = oneOf(r.phase, PHASES, name, line, col("phase"), "phase");
  const e = r.evidence;
  if (typeof e !== "object" || e === null || Array.isArray(e)) throw recordError(name, line, col("evidence"), `"evidence": expected an object with liveScore and referenceScores`);
  const evidence = e as Record<string, unknown>;
  const live = evidence.liveScore === null ? NaN : evidence.liveScore;
  if (typeof live !== "number") throw recordError(name, line, col("liveScore"), `"evidence.liveScore": expected a number, got ${JSON.stringify(evidence.liveScore) ?? "no such key"}`);
  const refs = evidence.referenceScores;
  if (!Array.isArray(refs) || !refs.every((v) => typeof v === "number" || v === null)) throw recordError(name, line, col("referenceScores"), `"evidence.referenceScores": expected an array of numbers`);
  const time = r.time;
  if (time !== undefined && typeof time !== "string" && typeof time !== "number") throw recordError(name, line, col("time"), `"time": expected a number or a string`);
  const decision: Decision = {
    index: r.index,
    action,
    cause,
    phase,
    evidence: { ...evidence, liveScore: live, referenceScores: refs.map((v) => (v === null ? NaN : (v as number))) },
  };
  return { decision, time: time === undefined ? null : time };
}

/** What a reader of a decision log learnt about it, filled in while it reads. */
export interface DecisionLogInfo {
  /** `"full"` (one decision per NDJSON line) or `"compact"` (rows between full lines); null before the first line. */
  format: "full" | "compact" | null;
  /**
   * Whether the log is known to be complete: a compact log that ends with its
   * closing line is; one without it was cut short (false). A full log carries
   * no closing line (null: unknown; a `.partial` name says it is incomplete).
   */
  complete: boolean | null;
}

/** Reads one compact log row against the last full line: its leaves, time and vocabulary. */
class CompactRows {
  /** Decisions read (full lines and rows). */
  count = 0;
  #base: Decision | null = null;
  #paths: Step[][] = [];
  #values: unknown[] = [];
  #hasTime = false;
  #time: string | number | null = null;
  #earlierTime: string | number | null = null;

  full(d: LoggedDecision): void {
    this.#base = { ...d.decision };
    const leaves = leavesOf(d.decision.evidence as unknown as Record<string, unknown>);
    this.#paths = leaves.paths;
    this.#values = leaves.values;
    this.#hasTime = d.time !== null;
    this.#time = d.time;
    this.#earlierTime = null;
  }

  row(text: string, name: string, line: number): LoggedDecision {
    const base = this.#base;
    if (base === null) throw recordError(name, line, 1, "a compact row before any full decision line; expected a decision object first");
    const cells = splitCells(text);
    const width = this.#paths.length + (this.#hasTime ? 1 : 0);
    if (cells.length !== width) throw recordError(name, line, 1, `expected ${width} cells (${this.#hasTime ? "time and " : ""}${this.#paths.length} evidence fields of the decision line before), got ${cells.length}`);
    let k = 0;
    let column = 1;
    let time: string | number | null = null;
    try {
      if (this.#hasTime) {
        const cell = cells[k++] as string;
        time = cell === "" ? predictTime(this.#time, this.#earlierTime) : (cellValue(cell) as string | number | null);
        if (typeof time !== "string" && typeof time !== "number") throw new SyntaxError(`expected a time (a number or a string), got ${cell}`);
        this.#earlierTime = this.#time;
        this.#time = time;
        column += cell.length + 1;
      }
      const values = this.#values.slice();
      for (let j = 0; j < values.length; j++, k++) {
        const cell = cells[k] as string;
        if (cell === "+") {
          const before = values[j];
          if (typeof before !== "number") throw new SyntaxError(`"+" follows ${JSON.stringify(before)}, not a number`);
          values[j] = before + 1;
        } else if (cell !== "") values[j] = cellValue(cell);
        column += cell.length + 1;
      }
      this.#values = values;
    } catch (error) {
      if (error instanceof SyntaxError) throw recordError(name, line, column, `compact row: ${error.message}`);
      throw error;
    }
    base.index++;
    const raw = { index: base.index, action: base.action, cause: base.cause, phase: base.phase, evidence: evidenceFrom(this.#paths, this.#values), ...(time === null ? {} : { time }) };
    return checkedDecision(raw, text, name, line);
  }
}

/**
 * Reads a decision log line by line, in constant memory: the full log (one
 * decision per NDJSON line; blank lines skipped) or the compact log (a
 * header line, full decision lines and rows, a closing line), told apart by
 * the first line. `info` is filled in as it reads (format, completeness).
 */
export async function* readDecisionLog(lines: AsyncIterable<LineBatch>, name: string, info: DecisionLogInfo = { format: null, complete: null }): AsyncGenerator<LoggedDecision[]> {
  let any = false;
  let compact: CompactRows | null = null;
  let ended = false;
  for await (const batch of lines) {
    const out: LoggedDecision[] = [];
    for (let k = 0; k < batch.lines.length; k++) {
      const text = batch.lines[k] as string;
      const line = batch.firstLine + k;
      if (info.format === null) {
        if (text.trim().length === 0) continue;
        const header = compactHeaderOf(text, name, line);
        info.format = header ? "compact" : "full";
        if (header) {
          compact = new CompactRows();
          info.complete = false;
          continue;
        }
      }
      if (ended) throw recordError(name, line, 1, "a line after the closing line of the compact log; expected nothing more");
      if (compact === null) {
        if (text.trim().length === 0) continue;
        out.push(parseDecisionLine(text, name, line));
      } else if (text.startsWith("{")) {
        const raw = parseJsonLine(text, name, line, "a decision object or the closing line");
        if (typeof raw === "object" && raw !== null && (raw as Record<string, unknown>).end === true) {
          const count = (raw as Record<string, unknown>).decisions;
          if (count !== compact.count) throw recordError(name, line, 1, `the closing line counts ${JSON.stringify(count)} decisions, but the log holds ${compact.count}`);
          ended = true;
          info.complete = true;
          continue;
        }
        const d = checkedDecision(raw, text, name, line);
        compact.full(d);
        compact.count++;
        out.push(d);
      } else {
        out.push(compact.row(text, name, line));
        compact.count++;
      }
    }
    if (out.length > 0) {
      any = true;
      yield out;
    }
  }
  if (!any) throw new InputError(`${name}: the decision log is empty; expected one decision per line`);
}

/** True when the line is the header of a compact log; a compact header of a newer version is refused. */
function compactHeaderOf(text: string, name: string, line: number): boolean {
  if (!text.includes(COMPACT_FORMAT)) return false;
  const raw = parseJsonLine(text, name, line, "the header of a compact decision log");
  if (typeof raw !== "object" || raw === null || (raw as Record<string, unknown>).format !== COMPACT_FORMAT) return false;
  const version = (raw as Record<string, unknown>).version;
  if (typeof version !== "number" || !Number.isInteger(version) || version < 1 || version > COMPACT_VERSION) {
    throw recordError(name, line, 1, `compact decision log version ${JSON.stringify(version)}; this leeway reads versions 1 to ${COMPACT_VERSION}`);
  }
  return true;
}
