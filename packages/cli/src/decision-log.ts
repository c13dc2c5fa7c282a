import { ACTIONS, CAUSES, PHASES, type Action, type Cause, type Decision, type Phase } from "@leeway/policy";
import { InputError } from "./exit-codes.js";
import type { LineBatch } from "./input/lines.js";
import { parseJsonLine, recordError } from "./input/position.js";

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

/** Reads a decision log line by line (blank lines skipped), in constant memory. */
export async function* readDecisionLog(lines: AsyncIterable<LineBatch>, name: string): AsyncGenerator<LoggedDecision[]> {
  let any = false;
  for await (const batch of lines) {
    const out: LoggedDecision[] = [];
    for (let k = 0; k < batch.lines.length; k++) {
      const text = batch.lines[k] as string;
      if (text.trim().length === 0) continue;
      out.push(parseDecisionLine(text, name, batch.firstLine + k));
    }
    if (out.length > 0) {
      any = true;
      yield out;
    }
  }
  if (!any) throw new InputError(`${name}: the decision log is empty; expected one decision per line`);
}
