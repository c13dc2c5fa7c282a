import { describe, expect, it } from "vitest";
import {
  checkTargets,
  defaultQualityEngineOptions,
  eventSeverity,
  NaivePolicy,
  onsetCusumAlarms,
  qualityMarkdown,
  qualityScenarios,
  qualitySubset,
  qualityTable,
  runQualityScenario,
  type QualityEvent,
  type QualityScenario,
  anomalyMask,
  compare,
  evaluate,
  mannWhitney,
  poissonInterval,
  prAuc,
  replay,
  responseClass,
  rocAuc,
  runLengths,
  sortFloat64,
  Timeline,
  type Pipeline,
} from "@leeway/eval";
import type { Action, Cause, Decision } from "@leeway/policy";
import { decimate, lowPassKernel } from "@leeway/signal";

// The @example of every export, run as written in its doc comment.
describe("documented examples", () => {
  it("anomalyMask", () => {
    expect(anomalyMask([{ cause: "anomaly", start: 2, end: 4 }], 6)).toEqual([false, false, true, true, false, false]);
  });

  it("responseClass", () => {
    expect(responseClass("switch-mode", "known-mode")).toBe("concept-drift");
    expect(responseClass("alarm", "degradation")).toBe("degradation");
    expect(responseClass("hold", "anomaly")).toBeNull();
  });

  it("Timeline", () => {
    const timeline = new Timeline();
    timeline.record({ index: 0, action: "alarm", cause: "anomaly", phase: "watching", evidence: { liveScore: 3.5, referenceScores: [4] } });
    expect(timeline.length).toBe(1);
    expect(timeline.actionAt(0)).toBe("alarm");
    expect(timeline.referenceScoreAt(0)).toBe(4);
  });

  it("mannWhitney, rocAuc, prAuc", () => {
    expect(mannWhitney([0.1, 0.4, 0.35, 0.8], [false, false, true, true])).toEqual({ u: 3, positives: 2, negatives: 2, auc: 0.75 });
    expect(rocAuc([0.1, 0.4, 0.35, 0.8], [false, false, true, true])).toBe(0.75);
    expect(prAuc([0.1, 0.4, 0.35, 0.8], [false, false, true, true])).toBeCloseTo(0.8333333, 6);
  });

  it("poissonInterval", () => {
    expect(poissonInterval(0, 0.95).upper).toBeCloseTo(3.68888, 5); // "3.6888…" = ln 40
    const one = poissonInterval(1, 0.95);
    expect(one.level).toBe(0.95);
    expect(one.lower).toBeCloseTo(0.02532, 5);
    expect(one.upper).toBeCloseTo(5.5716, 4);
  });

  it("runLengths", () => {
    const r = runLengths(Uint8Array.of(0, 0, 0, 0, 1, 1, 0, 0, 0, 0), Uint8Array.of(0, 1, 0, 0, 0, 0, 0, 0, 1, 0));
    expect([r.completed, r.censored, r.arl]).toEqual([[2, 3], [2, 1], 4]);
  });

  it("evaluate", () => {
    const t = new Timeline();
    const decide = (action: Action, cause: Cause): Decision => ({ index: t.length, action, cause, phase: "watching", evidence: { liveScore: 1, referenceScores: [1] } });
    for (let i = 0; i < 10; i++) t.record(i === 6 ? decide("alarm", "anomaly") : decide("learn", "normal"));
    const m = evaluate(t, { events: [{ cause: "anomaly", start: 4, end: 8 }] });
    expect([m.perEvent[0]?.delay, m.perEvent[0]?.claimed, m.falseAlarms, m.runLengths.exposure]).toEqual([2, "anomaly", 0, 6]);
  });

  it("replay", () => {
    const pipeline = { observe: (s: number): Decision => ({ index: 0, action: s > 5 ? "alarm" : "learn", cause: s > 5 ? "anomaly" : "normal", phase: "watching", evidence: { liveScore: s, referenceScores: [s] } }) };
    const { metrics } = replay(pipeline, [1, 2, 9, 9, 1], { events: [{ cause: "anomaly", start: 2, end: 4 }] });
    expect(metrics.perEvent[0]?.delay).toBe(0);
    expect(metrics.falseAlarms).toBe(0);
  });

  it("compare", () => {
    const above = (limit: number) => (): Pipeline<number> => ({
      observe: (s) => ({ index: 0, action: s > limit ? "alarm" : "learn", cause: s > limit ? "anomaly" : "normal", phase: "watching", evidence: { liveScore: s, referenceScores: [s] } }),
    });
    const table = compare(
      [
        { name: "limit 5", create: above(5) },
        { name: "limit 1.5", create: above(1.5) },
      ],
      [{ name: "rag", stream: () => [1, 2, 1, 9, 8, 1], labels: { events: [{ cause: "anomaly", start: 3, end: 5 }] } }],
    );
    expect(table.rows.map((r) => [r.policy, r.detected, r.falseAlarms])).toEqual([
      ["limit 5", 1, 0],
      ["limit 1.5", 1, 1],
    ]);
    expect(table.markdown.split("\n")[0]).toMatch(/^\| policy \| events \| detected \| right cause \| revised \| missed d\/g\/a \| /);
  });

  it("sortFloat64; lowPassKernel and decimate (now in @leeway/signal)", () => {
    expect(Array.from(sortFloat64(Float64Array.of(3, -1, 2.5, -0, 0)), (x) => (Object.is(x, -0) ? "-0" : x))).toEqual([-1, "-0", 0, 2.5, 3]);
    expect(lowPassKernel(0.1, 101).reduce((s, x) => s + x, 0)).toBeCloseTo(1, 14);
    const out = decimate(new Float64Array(4800).fill(1), 4);
    expect(out.length).toBe(1200);
    for (const y of out) expect(y).toBeCloseTo(1, 12);
  });

  it("qualityScenarios, qualitySubset, eventSeverity", () => {
    const suite = qualityScenarios();
    expect(suite.length).toBe(192);
    expect(suite[0]?.id).toBe("abrupt-shift/1 s/noise ×1.3/1");
    const s = suite[0] as QualityScenario;
    expect(eventSeverity(s, s.events[0] as QualityEvent, (s.events[0] as QualityEvent).start)).toBe(1);
    expect(qualitySubset().map((q) => q.kind)).toEqual(["abrupt-shift", "gradual-shift", "gain-change", "recurring-modes", "degradation", "fault", "fault", "degradation"]);
  });

  it("onsetCusumAlarms", () => {
    const scores = Float64Array.from({ length: 400 }, (_, i) => Math.exp((i >= 300 ? 3 : 0) + 0.1 * Math.sin(i * 12.9898)));
    const flags = onsetCusumAlarms({ scores, calibrationStart: 0, calibrationEnd: 200, events: [{ start: 300, end: 400 }], targetArl0: 1000 });
    expect(flags.indexOf(1)).toBe(300);
  });

  it("NaivePolicy, defaultQualityEngineOptions, qualityTable, checkTargets, qualityMarkdown", () => {
    const p = new NaivePolicy({ kind: "frozen", inputs: 4, hidden: 2, commissioning: 20, calibration: 20, run: 5, forgetting: 1, seed: "1" });
    expect(p.observe(Float64Array.of(1, 2, 3, 4)).phase).toBe("commissioning");
    expect(defaultQualityEngineOptions(1, 64)).toEqual({ inputs: 64, hidden: 8, members: 3, seed: 1, samplePeriod: 1, featureSignature: "rules" });
    expect(qualityTable([])).toEqual([]);
    expect(checkTargets([])).toEqual([]);
    expect(qualityMarkdown([], [], { title: "t", scenarios: 0, samples: 0, preamble: "", plot: null }).split("\n")[0]).toBe("# Decision quality: t");
  });

  it("runQualityScenario", () => {
    const s = qualityScenarios().find((q) => q.kind === "fault") as QualityScenario;
    const outcome = runQualityScenario(s, { operator: () => ({ after: () => {} }) });
    expect(outcome.policies.map((p) => p.policy)).toEqual(["engine, operator", "engine, unattended", "frozen only", "always adapt", "onset CUSUM"]);
  });
});
