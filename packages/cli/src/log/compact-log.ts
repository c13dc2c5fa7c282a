import type { Decision } from "@leeway/policy";
import { decisionLine } from "../decision-log.js";
import { COMPACT_DIGITS, predictTime, valueCell } from "./cells.js";
import { COMPACT_CHECKPOINT, COMPACT_FORMAT, COMPACT_VERSION } from "./format.js";
import { leavesOf } from "./leaves.js";


/** The header line of a compact log. */
export function compactHeader(): string {
  return JSON.stringify({ format: COMPACT_FORMAT, version: COMPACT_VERSION, digits: COMPACT_DIGITS, checkpoint: COMPACT_CHECKPOINT });
}

/** The closing line of a complete compact log; a log without it was cut short. */
export function compactEnd(decisions: number): string {
  return JSON.stringify({ end: true, decisions });
}

/**
 * Encodes a decision stream as a compact log, one line per sample. A full
 * decision line (the NDJSON of the full log) is written for the first
 * decision, whenever the action, cause or phase changes, whenever the
 * evidence gains or loses a field, when the index does not follow on, and
 * every {@link COMPACT_CHECKPOINT} samples. Every other sample is one row of
 * cells: its time, then each evidence leaf of the last full line in order;
 * an empty cell repeats the previous row's value (for the time: continues
 * its step), `+` is the previous integer plus one, and numbers that are not
 * integers keep six significant digits. A score replay writes about 30–45
 * bytes per sample instead of about 400.
 * @example
 * const log = new CompactLogWriter();
 * const lines = [compactHeader(), ...decisions.map((d, i) => log.line(d, times[i]))].join("\n");
 */
export class CompactLogWriter {
  #shape: string | null = null;
  #cells: string[] = [];
  #numbers: unknown[] = [];
  #action = "";
  #cause = "";
  #phase = "";
  #nextIndex = -1;
  #sinceFull = 0;
  #time: string | number | null = null;
  #earlierTime: string | number | null = null;
  #hasTime = false;

  /** The line of one decision (without its line end). */
  line(decision: Decision, time: string | number | null): string {
    const leaves = leavesOf(decision.evidence as unknown as Record<string, unknown>);
    const full =
      this.#shape === null ||
      decision.action !== this.#action ||
      decision.cause !== this.#cause ||
      decision.phase !== this.#phase ||
      decision.index !== this.#nextIndex ||
      leaves.shape !== this.#shape ||
      (time !== null) !== this.#hasTime ||
      this.#sinceFull >= COMPACT_CHECKPOINT;
    const cells = leaves.values.map(valueCell);
    this.#nextIndex = decision.index + 1;
    if (full) {
      this.#shape = leaves.shape;
      this.#action = decision.action;
      this.#cause = decision.cause;
      this.#phase = decision.phase;
      this.#hasTime = time !== null;
      this.#sinceFull = 0;
      this.#cells = cells;
      this.#numbers = leaves.values;
      this.#earlierTime = null;
      this.#time = time;
      return decisionLine(decision, time);
    }
    this.#sinceFull++;
    const out: string[] = [];
    if (this.#hasTime) {
      out.push(time === predictTime(this.#time, this.#earlierTime) ? "" : timeCell(time));
      this.#earlierTime = this.#time;
      this.#time = time;
    }
    for (let j = 0; j < cells.length; j++) {
      const cell = cells[j] as string;
      const before = this.#numbers[j];
      const now = leaves.values[j];
      if (cell === this.#cells[j]) out.push("");
      else if (typeof now === "number" && typeof before === "number" && Number.isSafeInteger(now) && now === before + 1) out.push("+");
      else out.push(cell);
    }
    this.#cells = cells;
    this.#numbers = leaves.values;
    return out.join(",");
  }
}

/** A time cell keeps the time exactly (numbers in full, text as JSON). */
export function timeCell(time: string | number | null): string {
  return typeof time === "number" ? String(time) : time === null ? "-" : JSON.stringify(time);
}

/** The two forms of the decision log: `"compact"` (the default) or `"full"` (every decision with its whole evidence). */
export type LogForm = "compact" | "full";

/** Writes a decision log of either form: its first line (if any), one line per decision, its closing line (if any). */
export interface DecisionLogFormat {
  /** File name in an output folder. */
  fileName: string;
  header(): string | null;
  line(decision: Decision, time: string | number | null): string;
  end(decisions: number): string | null;
}

/**
 * The writer of a log form.
 * @example
 * logFormat("full").line(decision, null); // the decision as one NDJSON line
 */
export function logFormat(form: LogForm): DecisionLogFormat {
  if (form === "full") return { fileName: "decisions.ndjson", header: () => null, line: decisionLine, end: () => null };
  const writer = new CompactLogWriter();
  return { fileName: "decisions.log", header: compactHeader, line: (d, t) => writer.line(d, t), end: compactEnd };
}
