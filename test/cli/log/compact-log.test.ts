import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { DecisionEngine, type Decision } from "@leeway/policy";
import { decisionLine, readDecisionLog, type DecisionLogInfo, type LoggedDecision } from "../../../packages/cli/src/decision-log.js";
import { readLines } from "../../../packages/cli/src/input/lines.js";
import { compactEnd, compactHeader, CompactLogWriter } from "../../../packages/cli/src/log/compact-log.js";
import { COMPACT_DIGITS } from "../../../packages/cli/src/log/cells.js";
import { handMadeDecisions } from "../hand-made.js";
import { scoreRows, SHORT_ENGINE } from "../streams.js";

function compactText(decisions: readonly Decision[], times: readonly (string | number | null)[], complete = true): string {
  const writer = new CompactLogWriter();
  const lines = [compactHeader(), ...decisions.map((d, i) => writer.line(d, times[i] ?? null))];
  if (complete) lines.push(compactEnd(decisions.length));
  return lines.join("\n") + "\n";
}

async function readBack(text: string): Promise<{ decisions: LoggedDecision[]; info: DecisionLogInfo }> {
  const info: DecisionLogInfo = { format: null, complete: null };
  const decisions: LoggedDecision[] = [];
  for await (const batch of readDecisionLog(readLines((async function* () { yield Buffer.from(text); })(), { name: "log" }), "log", info)) decisions.push(...batch);
  return { decisions, info };
}

/** A value as the compact log keeps it: integers exactly, other numbers to six significant digits. */
function rounded(v: unknown): unknown {
  if (typeof v === "number") return Number.isFinite(v) ? (Number.isSafeInteger(v) ? v : Number(v.toPrecision(COMPACT_DIGITS))) : null;
  if (Array.isArray(v)) return v.map(rounded);
  if (typeof v === "object" && v !== null) return Object.fromEntries(Object.entries(v).map(([k, x]) => [k, rounded(x)]));
  return v;
}

describe("compact decision log", () => {
  it("reads back every decision: action, cause, phase and index exactly, evidence to six significant digits, times exactly", async () => {
    const decisions = handMadeDecisions(3000);
    const times = decisions.map((_, i) => new Date(Date.UTC(2026, 2, 2, 10) + 10_000 * i + (i === 1700 ? 3000 : 0)).toISOString().replace(".000", ""));
    const { decisions: back, info } = await readBack(compactText(decisions, times));
    expect(info).toEqual({ format: "compact", complete: true });
    expect(back.length).toBe(3000);
    back.forEach((b, i) => {
      const d = decisions[i] as Decision;
      expect([b.decision.index, b.decision.action, b.decision.cause, b.decision.phase, b.time]).toEqual([d.index, d.action, d.cause, d.phase, times[i]]);
      expect(rounded(b.decision.evidence)).toEqual(rounded(d.evidence));
    });
  });

  it("property: any decision stream reads back as written (evidence within the rounding)", () => {
    const leaf = fc.oneof(fc.double({ noNaN: false }), fc.integer(), fc.constantFrom("up", "down", 'a,"b"'), fc.boolean(), fc.constant(null));
    const decision = fc.record({
      action: fc.constantFrom("learn", "hold", "alarm" as const),
      cause: fc.constantFrom("normal", "anomaly" as const),
      phase: fc.constantFrom("watching", "latched" as const),
      live: fc.double({ min: 0, max: 1e6, noNaN: true }),
      refs: fc.array(fc.double({ min: 0, max: 10, noNaN: true }), { maxLength: 2 }),
      extra: fc.dictionary(fc.constantFrom("change", "trend", "mode"), fc.oneof(leaf, fc.dictionary(fc.constantFrom("statistic", "z", "moved"), fc.oneof(leaf, fc.array(fc.integer(), { maxLength: 3 })), { maxKeys: 3 })), { maxKeys: 3 }),
      time: fc.oneof(fc.constant(null), fc.integer({ min: 0, max: 100 })),
    });
    fc.assert(
      fc.asyncProperty(fc.array(decision, { minLength: 1, maxLength: 40 }), fc.boolean(), async (items, timed) => {
        const decisions: Decision[] = items.map((x, i) => ({ index: i, action: x.action, cause: x.cause, phase: x.phase, evidence: { liveScore: x.live, referenceScores: x.refs, ...x.extra } }));
        const times = items.map((x, i) => (timed ? (x.time ?? i) : null));
        const { decisions: back } = await readBack(compactText(decisions, times));
        expect(back.length).toBe(decisions.length);
        back.forEach((b, i) => {
          const d = decisions[i] as Decision;
          expect([b.decision.index, b.decision.action, b.decision.cause, b.decision.phase, b.time]).toEqual([d.index, d.action, d.cause, d.phase, times[i]]);
          expect(rounded(JSON.parse(JSON.stringify(b.decision.evidence)))).toEqual(rounded(JSON.parse(JSON.stringify(d.evidence))));
        });
      }),
      { numRuns: 150 },
    );
  });

  it("a score replay takes well under 60 bytes a sample (the full log about 400)", async () => {
    const engine = new DecisionEngine(SHORT_ENGINE);
    const rows = scoreRows(20_000, 11, 1.8, 12_000);
    const decisions = rows.map((r) => engine.observeScores(r.live, [r.ref]));
    const times = rows.map((_, i) => i);
    const compact = Buffer.byteLength(compactText(decisions, times));
    const full = decisions.reduce((n, d, i) => n + Buffer.byteLength(decisionLine(d, times[i] as number)) + 1, 0);
    expect(compact / rows.length).toBeLessThan(60);
    expect(full / compact).toBeGreaterThan(5);
    const { decisions: back } = await readBack(compactText(decisions, times));
    expect(back.map((b) => b.decision.action)).toEqual(decisions.map((d) => d.action));
  });

  it("a log without its closing line reads as incomplete; a wrong count, a newer version or a row before any decision is refused", async () => {
    const decisions = handMadeDecisions(50);
    const cut = await readBack(compactText(decisions, [], false));
    expect(cut.info.complete).toBe(false);
    expect(cut.decisions.length).toBe(50);
    const text = compactText(decisions, []);
    await expect(readBack(text.replace('"decisions":50', '"decisions":51'))).rejects.toThrow(/closing line counts 51 decisions, but the log holds 50/);
    await expect(readBack(text.replace('"version":1', '"version":9'))).rejects.toThrow(/log:1:1: compact decision log version 9/);
    await expect(readBack(`${compactHeader()}\n0.1,\n`)).rejects.toThrow(/log:2:1: a compact row before any full decision line/);
    const lines = text.split("\n");
    lines[5] = "0.1,2,3,4,5,6,7,8,9";
    await expect(readBack(lines.join("\n"))).rejects.toThrow(/log:6:1: expected \d+ cells/);
  });
});
