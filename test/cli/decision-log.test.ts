import { describe, expect, it } from "vitest";
import { decisionLine, parseDecisionLine, readDecisionLog } from "../../packages/cli/src/decision-log.js";
import { InputError } from "../../packages/cli/src/exit-codes.js";
import { readLines } from "../../packages/cli/src/input/lines.js";
import { handMadeDecisions } from "./hand-made.js";

describe("decision log", () => {
  it("a decision written and read back is the same decision, with its time", () => {
    for (const d of handMadeDecisions(300)) {
      const back = parseDecisionLine(decisionLine(d, "2026-12-01T00:00:00Z"), "log", 1);
      expect(back.decision).toEqual(d);
      expect(back.time).toBe("2026-12-01T00:00:00Z");
    }
    expect(parseDecisionLine(decisionLine(handMadeDecisions(1)[0]!, null), "log", 1).time).toBeNull();
  });
  it("a non-finite score is written as null and read back as NaN", () => {
    const d = { index: 3, action: "hold" as const, cause: "normal" as const, phase: "watching" as const, evidence: { liveScore: NaN, referenceScores: [Infinity] } };
    const line = decisionLine(d, null);
    expect(line).toContain('"liveScore":null');
    const back = parseDecisionLine(line, "log", 1).decision;
    expect(back.evidence.liveScore).toBeNaN();
    expect(back.evidence.referenceScores[0]).toBeNaN();
  });
  it("refuses unknown vocabulary and missing fields, naming line and column", () => {
    const good = JSON.parse(decisionLine(handMadeDecisions(1)[0]!, null)) as Record<string, unknown>;
    const bad = (patch: Record<string, unknown>): string => JSON.stringify({ ...good, ...patch });
    expect(() => parseDecisionLine(bad({ action: "panic" }), "log", 9)).toThrow(/^log:9:\d+: "action": expected one of learn, hold, retrain/);
    expect(() => parseDecisionLine(bad({ cause: "weather" }), "log", 9)).toThrow('"cause": expected one of');
    expect(() => parseDecisionLine(bad({ index: -1 }), "log", 9)).toThrow('"index": expected an integer >= 0');
    expect(() => parseDecisionLine(bad({ evidence: { referenceScores: [] } }), "log", 9)).toThrow('"evidence.liveScore": expected a number');
    expect(() => parseDecisionLine("{oops", "log", 9)).toThrow(InputError);
  });
  it("reads a log in batches and refuses an empty one", async () => {
    const text = handMadeDecisions(50).map((d) => decisionLine(d, null)).join("\n") + "\n\n";
    let n = 0;
    for await (const batch of readDecisionLog(readLines((async function* () { yield Buffer.from(text); })(), { name: "log" }), "log")) n += batch.length;
    expect(n).toBe(50);
    const empty = readDecisionLog(readLines((async function* () { yield Buffer.from("\n"); })(), { name: "log" }), "log");
    await expect(empty.next()).rejects.toThrow("the decision log is empty");
  });
});
