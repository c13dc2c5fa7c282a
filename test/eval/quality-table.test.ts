import { describe, expect, it } from "vitest";
import { checkTargets, qualityMarkdown, qualityTable, quantile, QUALITY_POLICIES, type EventOutcome, type ScenarioOutcome } from "@leeway/eval";

const event = (over: Partial<EventOutcome>): EventOutcome => ({
  kind: "degradation",
  cause: "degradation",
  start: 100,
  end: 200,
  knownMode: false,
  detected: true,
  claimed: "degradation",
  delay: 10,
  reactionDelay: 3,
  severityAtDetection: 0.1,
  degradationAlarmSeverity: 0.1,
  learnt: 0,
  learntAfterWarning: 0,
  alarms: 1,
  degradationAlarms: 1,
  pages: 1,
  adaptations: 0,
  ...over,
});

function outcome(id: string, events: EventOutcome[], falseAlarms = 0): ScenarioOutcome {
  return { id, kind: "degradation", rate: "1 s", variant: "v", samples: 1000, policies: QUALITY_POLICIES.map((policy) => ({ policy, samples: 1000, exposure: 500, falseAlarms, events })) };
}

describe("qualityTable", () => {
  it("pools scenarios per kind, rate and policy: shares over events, nearest-rank delays, false alarms per 10^5 over the pooled exposure", () => {
    const rows = qualityTable([
      outcome("a", [event({ delay: 10, degradationAlarmSeverity: 0.1 })], 1),
      outcome("b", [event({ delay: 30, degradationAlarmSeverity: 0.6, learnt: 40, learntAfterWarning: 5 })]),
      outcome("c", [event({ delay: null, detected: false, claimed: "none", degradationAlarmSeverity: null, learntAfterWarning: null })]),
    ]);
    expect(rows).toHaveLength(QUALITY_POLICIES.length);
    const r = rows[0]!;
    expect([r.scenarios, r.events, r.samples]).toEqual([3, 3, 3000]);
    expect(r.detectionRate).toBeCloseTo(2 / 3, 12);
    expect(r.rightCauseRate).toBeCloseTo(2 / 3, 12);
    expect([r.medianDelay, r.p90Delay]).toEqual([10, 30]);
    expect(r.degradationAlarmedBeforeHalf).toBeCloseTo(1 / 3, 12);
    expect(r.medianDegradationAlarmSeverity).toBe(0.6); // 0.1, 0.6 and 1 for the missed one
    expect([r.learntDuringDegradation, r.maxLearntDuringDegradation, r.maxLearntAfterWarning]).toEqual([40 / 3, 40, 5]);
    expect(r.falseAlarmsPer1e5).toBeCloseTo((1e5 * 1) / 1500, 9);
    expect(r.absorbedOnce).toBeNull();
  });

  it("quantile is the nearest rank: the smallest value with at least q of the values at or below it", () => {
    expect(quantile([1, 2, 3, 4, 5, 6, 7, 8, 9, 10], 0.9)).toBe(9);
    expect(quantile([1, 2, 3, 4], 0.5)).toBe(2);
    expect(quantile([], 0.5)).toBeNull();
  });
});

describe("checkTargets", () => {
  it("holds a field to a fixed bound, or to a multiple of another policy's figure (plus the offset)", () => {
    const rows = qualityTable([outcome("a", [event({ learnt: 50, delay: 4 })])]).map((r) => (r.policy === "always adapt" ? { ...r, learntDuringDegradation: 100 } : r));
    const checks = checkTargets(rows);
    const find = (id: string, policy: string) => checks.find((c) => c.target.id === id && c.policy === policy)!;
    expect(find("degradation-beats-always-adapt", "engine, operator")).toMatchObject({ actual: 50, bound: 100, met: true });
    expect(find("degradation-alarmed-before-half", "engine, unattended")).toMatchObject({ actual: 1, bound: 1, met: true });
    expect(checks.every((c) => c.policy.startsWith("engine"))).toBe(true);
    const worse = checkTargets(rows.map((r) => (r.policy.startsWith("engine") ? { ...r, learntDuringDegradation: 100 } : r)));
    expect(worse.find((c) => c.target.id === "degradation-beats-always-adapt")?.met).toBe(false);
  });

  it("the document lists every kind present and every check", () => {
    const rows = qualityTable([outcome("a", [event({})])]);
    const md = qualityMarkdown(rows, checkTargets(rows), { title: "test", scenarios: 1, samples: 1000, preamble: "", plot: "p.svg" });
    expect(md).toContain("## Slow degradation");
    expect(md).toContain("](p.svg)");
    expect(md).toContain("| degradation-learnt-after-warning |");
  });
});
