import { describe, expect, it } from "vitest";
import { compare, evaluate, poissonInterval, replay, type Pipeline, type SuiteScenario } from "@leeway/eval";
import type { Decision } from "@leeway/policy";
import { expectLeewayError } from "../support/errors.js";

// Two hand-made policies on score streams: a low and a high alarm threshold; the high one also
// "retrains" once its score has stayed high for 5 samples (absorbing whatever is going on).
function policy(threshold: number, retrainAfter: number | null): () => Pipeline<number> {
  return () => {
    let index = 0;
    let highRun = 0;
    return {
      observe(score: number): Decision {
        highRun = score > threshold ? highRun + 1 : 0;
        const retrain = retrainAfter !== null && highRun === retrainAfter;
        const action = retrain ? "retrain" : highRun > 0 ? "alarm" : "learn";
        const cause = retrain ? "concept-drift" : highRun > 0 ? "anomaly" : "normal";
        return { index: index++, action, cause, phase: "watching", evidence: { liveScore: score, referenceScores: [score] } };
      },
    };
  };
}

const level = (n: number, base: number, bumps: [number, number, number][]): number[] => {
  const xs = new Array<number>(n).fill(base);
  for (const [from, to, value] of bumps) for (let i = from; i < to; i++) xs[i] = value;
  return xs;
};

const noiseFloor = level(200, 1, [[30, 31, 3.5], [100, 200, 4]]); // a spike at 30; a permanent step at 100 (drift)
const bearing = level(200, 1, [[120, 200, 6]]); // a degradation from 120
const suite: SuiteScenario<number>[] = [
  { name: "noise floor", stream: () => noiseFloor, labels: { events: [{ cause: "concept-drift", start: 100, end: 101 }] } },
  { name: "bearing", stream: () => bearing, labels: { events: [{ cause: "degradation", start: 120, end: 200 }], anomaly: bearing.map((x) => x > 1) } },
];
const policies = [
  { name: "low threshold", create: policy(3, null) },
  { name: "high threshold, adapts", create: policy(3.8, 5) },
];

describe("compare", () => {
  const result = compare(policies, suite);

  it("pools per-scenario metrics into one row per policy", () => {
    expect(result.rows.map((r) => r.policy)).toEqual(["low threshold", "high threshold, adapts"]);
    for (const [p, entry] of policies.entries()) {
      const runs = suite.map((s) => evaluate(replay(entry.create(), s.stream(), s.labels).timeline, s.labels));
      const row = result.rows[p];
      const falseAlarms = runs.reduce((sum, m) => sum + m.falseAlarms, 0);
      const exposure = runs.reduce((sum, m) => sum + m.runLengths.exposure, 0);
      expect(row?.events).toBe(2);
      expect(row?.detected).toBe(runs.reduce((sum, m) => sum + m.detected, 0));
      expect(row?.missedByCause.degradation).toBe(runs.reduce((sum, m) => sum + m.missedByCause.degradation, 0));
      expect(row?.falseAlarms).toBe(falseAlarms);
      expect(row?.exposure).toBe(exposure);
      expect(row?.falseAlarmsPer10k).toBeCloseTo((1e4 * falseAlarms) / exposure, 12);
      expect(row?.arlLower).toBeCloseTo(exposure / poissonInterval(falseAlarms).upper, 9);
      expect(row?.retrains).toBe(runs.reduce((sum, m) => sum + m.retrains.count, 0));
      expect(row?.rocAuc).toBe(runs[1]?.scores?.reference?.rocAuc);
    }
  });

  it("shows what each policy did: both call everything an anomaly; the adapting one retrains in the drift and during the degradation", () => {
    const [low, adapting] = result.rows;
    expect(low?.falseAlarms).toBe(1); // the spike at 30
    expect(low?.correctCause).toBe(0); // anomaly alarms on a drift and on a degradation
    expect(low?.retrains).toBe(0);
    // Drift: alarm at 100 (the detection, claiming anomaly), retrain at 104 (a revision to the true cause),
    // a new alarm at 105 (false: the drift was answered).
    expect(adapting?.falseAlarms).toBe(1);
    expect(adapting?.revisions).toBe(1);
    expect(low?.revisions).toBe(0);
    expect(adapting?.retrainsByTruth).toEqual({ "concept-drift": 1, degradation: 1, anomaly: 0, none: 0 });
    expect(result.perScenario.map((r) => [r.policy, r.scenarios[0], r.detected, r.meanDelay])).toEqual([
      ["low threshold", "noise floor", 1, 0],
      ["low threshold", "bearing", 1, 0],
      ["high threshold, adapts", "noise floor", 1, 0],
      ["high threshold, adapts", "bearing", 1, 0],
    ]);
  });

  it("renders the table in Markdown, one line per policy, then one per policy and scenario", () => {
    const lines = result.markdown.trim().split("\n");
    expect(lines[0]).toMatch(/^\| policy \| events \| detected \| right cause \| revised \| missed d\/g\/a \|/);
    expect(lines.filter((l) => l.startsWith("| low threshold |"))).toHaveLength(3);
    expect(lines.some((l) => l.startsWith("| low threshold | noise floor |"))).toBe(true);
    const header = (lines[0] as string).split("|").length;
    for (const line of lines.filter((l) => l.startsWith("| high threshold, adapts | 2 |"))) expect(line.split("|").length).toBe(header);
  });

  it("gives the same rows as JSON", () => {
    const parsed = JSON.parse(result.json) as { suite: string[]; rows: unknown[]; perScenario: unknown[] };
    expect(parsed.suite).toEqual(["noise floor", "bearing"]);
    expect(parsed.rows).toEqual(JSON.parse(JSON.stringify(result.rows)));
    expect(parsed.perScenario).toHaveLength(4);
  });

  it("refuses empty or ambiguous policy lists and suites", () => {
    expectLeewayError(() => compare([], suite), "E_OPTION", "policies");
    expectLeewayError(() => compare(policies, []), "E_OPTION", "suite");
    expectLeewayError(() => compare([policies[0] as never, policies[0] as never], suite), "E_OPTION", "policies[1].name", "low threshold");
    expectLeewayError(() => compare(policies, suite, { maxDelay: 0 }), "E_OPTION", "compare", "maxDelay");
  });
});
