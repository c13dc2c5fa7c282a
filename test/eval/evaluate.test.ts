import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { evaluate, type LabelledEvent } from "@leeway/eval";
import { expectLeewayError } from "../support/errors.js";
import { decisions, timelineOf, type Mark } from "./fixtures.js";

// A hand-made day of skid PS-2, 100 samples: commissioning 0–9, a new noise floor
// (concept drift) at 20, a bearing defect growing from 50 on (degradation) and a
// rag in the impeller at 70–74 (anomaly).
const events: LabelledEvent[] = [
  { id: "compressor", type: "environment-shift", cause: "concept-drift", start: 20, end: 21 },
  { id: "bearing", type: "degradation", cause: "degradation", start: 50, end: 100 },
  { id: "rag", type: "fault", cause: "anomaly", start: 70, end: 75 },
];
const marks: Mark[] = [
  { from: 0, to: 10, action: "learn", cause: "commissioning", phase: "commissioning" },
  { from: 5, action: "alarm", cause: "anomaly", phase: "commissioning" }, // ignored: commissioning
  { from: 15, action: "alarm", cause: "anomaly" }, // false alarm before any event
  { from: 21, to: 28, action: "hold", cause: "concept-drift", phase: "settling" },
  { from: 28, action: "switch-mode", cause: "known-mode" }, // answers the drift, delay 8
  { from: 40, action: "alarm", cause: "anomaly" }, // false alarm after the drift was answered
  { from: 60, to: 65, action: "alarm", cause: "degradation", phase: "latched" }, // one response, delay 10
  { from: 72, action: "alarm", cause: "anomaly" }, // answers the rag, delay 2
  { from: 80, action: "alarm", cause: "anomaly" }, // repeat: inside the degradation
  { from: 90, action: "retrain", cause: "concept-drift" }, // repeat: a retrain during degradation
];

describe("evaluate on a hand-made timeline", () => {
  const metrics = evaluate(timelineOf(decisions(100, marks)), { events });

  it("attributes the first response in each window, with its delay and claim", () => {
    expect(metrics.perEvent.map((e) => [e.id, e.response?.position ?? null, e.delay, e.claimed, e.correct, e.windowEnd])).toEqual([
      ["compressor", 28, 8, "concept-drift", true, 50],
      ["bearing", 60, 10, "degradation", true, 70],
      ["rag", 72, 2, "anomaly", true, 100],
    ]);
    expect(metrics.events).toBe(3);
    expect(metrics.detected).toBe(3);
    expect(metrics.missed).toBe(0);
    expect(metrics.correctCause).toBe(3);
    expect(metrics.delay).toEqual({ count: 3, mean: 20 / 3, median: 8, max: 10 });
    expect(metrics.delayByCause["concept-drift"]).toEqual({ count: 1, mean: 8, median: 8, max: 8 });
  });

  it("counts the responses outside events as false alarms and those inside faults as repeats", () => {
    expect(metrics.responses.map((r) => r.position)).toEqual([15, 28, 40, 60, 72, 80, 90]);
    expect(metrics.falseAlarms).toBe(2);
    expect(metrics.repeats).toBe(2);
    expect(metrics.confusion).toEqual({
      "concept-drift": { "concept-drift": 1, degradation: 0, anomaly: 0, none: 0 },
      degradation: { "concept-drift": 0, degradation: 1, anomaly: 0, none: 0 },
      anomaly: { "concept-drift": 0, degradation: 0, anomaly: 1, none: 0 },
      none: { "concept-drift": 0, degradation: 0, anomaly: 2, none: 0 },
    });
  });

  it("measures exposure, false alarms per 10^4 and run lengths over the in-control samples", () => {
    // In control: 10–19 and 29–49 (commissioning, the drift up to its answer, the degradation excluded).
    expect(metrics.runLengths.exposure).toBe(10 + 21);
    expect(metrics.falseAlarmsPer10k).toBeCloseTo((1e4 * 2) / 31, 12);
    expect(metrics.runLengths.completed).toEqual([6, 12]); // 10–15, 29–40
    expect(metrics.runLengths.censored).toEqual([4, 9]); // 16–19, 41–49
    expect(metrics.runLengths.arl).toBe(15.5);
    expect(metrics.runLengths.falseAlarms).toBe(metrics.falseAlarms);
  });

  it("tallies retrains, switches and alarms by the truth at the time, and learning during faults", () => {
    expect(metrics.retrains).toEqual({ count: 1, byTruth: { "concept-drift": 0, degradation: 1, anomaly: 0, none: 0 } });
    expect(metrics.modeSwitches).toEqual({ count: 1, byTruth: { "concept-drift": 1, degradation: 0, anomaly: 0, none: 0 } });
    // The false alarm at 40 lies in the drift's window (what was going on), the one at 15 before any event.
    expect(metrics.alarms).toEqual({ count: 5, byTruth: { "concept-drift": 1, degradation: 2, anomaly: 1, none: 1 } });
    // 50–99: 50 samples, of which 8 are not learnt (60–64, 72, 80, 90) → 42 learnt;
    // the rag's 70–74 count as anomaly (4 learnt, 72 is the alarm), the other 38 as degradation.
    expect(metrics.learnedDuring).toEqual({ degradation: 50 - 8 - 4, anomaly: 5 - 1 });
  });
});

describe("evaluate: windows, misses and claims", () => {
  it("an event with no response before the next event's start is missed, and the window is not exposure", () => {
    const m = evaluate(timelineOf(decisions(60, [{ from: 45, action: "alarm", cause: "anomaly" }])), {
      events: [
        { cause: "degradation", start: 10, end: 20 },
        { cause: "anomaly", start: 40, end: 50 },
      ],
    });
    expect(m.perEvent.map((e) => [e.claimed, e.delay])).toEqual([
      ["none", null],
      ["anomaly", 5],
    ]);
    expect(m.missed).toBe(1);
    expect(m.missedByCause).toEqual({ "concept-drift": 0, degradation: 1, anomaly: 0 });
    expect(m.confusion.degradation.none).toBe(1);
    // Excluded: 10–39 (the missed window), 40–49 (the anomaly): exposure 0–9 and 50–59.
    expect(m.runLengths.exposure).toBe(20);
    expect(m.runLengths.censored).toEqual([10, 10]);
  });

  it("maxDelay closes the window: a late response is a false alarm", () => {
    const ds = decisions(100, [{ from: 60, action: "retrain", cause: "concept-drift" }]);
    const labels = { events: [{ cause: "concept-drift" as const, start: 10, end: 11 }] };
    expect(evaluate(timelineOf(ds), labels).perEvent[0]?.delay).toBe(50);
    const strict = evaluate(timelineOf(ds), labels, { maxDelay: 30 });
    expect(strict.perEvent[0]?.windowEnd).toBe(40);
    expect(strict.missed).toBe(1);
    expect(strict.falseAlarms).toBe(1);
    expect(strict.retrains.byTruth.none).toBe(1); // outside the closed window
    expect(strict.runLengths.exposure).toBe(100 - 30);
  });

  it("a wrong claim is detected but not correct: an anomaly alarm on a concept drift (a frozen model's answer)", () => {
    const m = evaluate(timelineOf(decisions(50, [{ from: 12, to: 50, action: "alarm", cause: "anomaly", phase: "latched" }])), {
      events: [{ cause: "concept-drift", start: 10, end: 50 }],
    });
    expect(m.detected).toBe(1);
    expect(m.correctCause).toBe(0);
    expect(m.confusion["concept-drift"].anomaly).toBe(1);
    expect(m.responses).toHaveLength(1); // the latched alarm is one response
  });

  it("a later claim of the true cause revises a wrong first answer and is no false alarm; a repeated wrong claim is one", () => {
    // An alarm on the compressor's new noise floor (claims anomaly), a retrain (claims drift), then another anomaly alarm.
    const m = evaluate(
      timelineOf(
        decisions(60, [
          { from: 12, to: 20, action: "alarm", cause: "anomaly", phase: "latched" },
          { from: 30, action: "retrain", cause: "concept-drift" },
          { from: 45, action: "alarm", cause: "anomaly" },
        ]),
      ),
      { events: [{ cause: "concept-drift", start: 10, end: 11 }] },
    );
    const [event] = m.perEvent;
    expect([event?.claimed, event?.correct, event?.delay, event?.revision?.position]).toEqual(["anomaly", false, 2, 30]);
    expect(m.revisions).toBe(1);
    expect(m.confusion["concept-drift"].anomaly).toBe(1);
    expect(m.falseAlarms).toBe(1); // the alarm at 45
    expect(m.retrains.byTruth["concept-drift"]).toBe(1);
  });

  it("a retrain that completes an await-confirmation is part of the same response", () => {
    const m = evaluate(
      timelineOf(
        decisions(40, [
          { from: 15, to: 20, action: "await-confirmation", cause: "concept-drift" },
          { from: 20, to: 24, action: "hold", cause: "concept-drift", phase: "settling" },
          { from: 24, action: "retrain", cause: "operator", phase: "retraining" },
        ]),
      ),
      { events: [{ cause: "concept-drift", start: 10, end: 11 }] },
    );
    expect(m.responses).toEqual([{ position: 15, action: "await-confirmation", cause: "concept-drift", claims: "concept-drift", completedAt: 24 }]);
    expect(m.falseAlarms).toBe(0);
    expect(m.retrains).toEqual({ count: 1, byTruth: { "concept-drift": 1, degradation: 0, anomaly: 0, none: 0 } });
  });

  it("the same action with another cause starts a new response; claim-less alarms are not responses", () => {
    const m = evaluate(
      timelineOf(
        decisions(30, [
          { from: 5, to: 8, action: "alarm", cause: "anomaly" },
          { from: 8, to: 10, action: "alarm", cause: "degradation" },
          { from: 20, action: "alarm", cause: "operator" },
        ]),
      ),
    );
    expect(m.responses.map((r) => [r.position, r.claims])).toEqual([
      [5, "anomaly"],
      [8, "degradation"],
    ]);
    expect(m.falseAlarms).toBe(2);
    expect(m.alarms.count).toBe(3);
    expect(m.confusion.none).toEqual({ "concept-drift": 0, degradation: 1, anomaly: 1, none: 0 });
  });

  it("one response answers events that start together; events beyond the stream are not measured", () => {
    const m = evaluate(timelineOf(decisions(20, [{ from: 7, action: "alarm", cause: "anomaly" }])), {
      events: [
        { cause: "anomaly", start: 5, end: 9 },
        { cause: "degradation", start: 5, end: 20 },
        { cause: "anomaly", start: 25, end: 30 },
      ],
    });
    expect(m.perEvent.map((e) => [e.cause, e.delay, e.correct])).toEqual([
      ["anomaly", 2, true],
      ["degradation", 2, false],
    ]);
    expect(m.eventsBeyondStream).toBe(1);
  });

  it("without labels every response is a false alarm over the whole watched stream", () => {
    const m = evaluate(
      timelineOf(
        decisions(50, [
          { from: 0, to: 10, action: "learn", cause: "commissioning", phase: "commissioning" },
          { from: 19, action: "alarm", cause: "anomaly" },
          { from: 39, action: "alarm", cause: "anomaly" },
        ]),
      ),
    );
    expect(m.falseAlarms).toBe(2);
    expect(m.runLengths.exposure).toBe(40);
    expect(m.runLengths.completed).toEqual([10, 20]);
    expect(m.runLengths.censored).toEqual([10]);
    expect(m.runLengths.arl).toBe(20);
    expect(m.runLengths.interval.lower).toBeLessThan(20);
    expect(m.runLengths.interval.upper).toBeGreaterThan(20);
  });
});

describe("evaluate: laws", () => {
  const randomTimeline = fc.record({
    n: fc.integer({ min: 1, max: 300 }),
    marks: fc.array(
      fc.record({
        from: fc.integer({ min: 0, max: 299 }),
        length: fc.integer({ min: 1, max: 20 }),
        action: fc.constantFrom("alarm", "retrain", "switch-mode", "await-confirmation", "hold", "learn" as const),
        cause: fc.constantFrom("anomaly", "degradation", "concept-drift", "known-mode", "operator", "normal" as const),
      }),
      { maxLength: 20 },
    ),
    events: fc.array(
      fc.record({ cause: fc.constantFrom("anomaly", "degradation", "concept-drift" as const), start: fc.integer({ min: 0, max: 320 }), length: fc.integer({ min: 1, max: 80 }) }),
      { maxLength: 6 },
    ),
  });

  it("every response is exactly one of: a detection, a revision, a repeat or a false alarm; in-control runs add up to the exposure", () => {
    fc.assert(
      fc.property(randomTimeline, ({ n, marks, events }) => {
        const ds = decisions(
          n,
          marks.filter((m) => m.from < n).map((m) => ({ from: m.from, to: Math.min(n, m.from + m.length), action: m.action, cause: m.cause })),
        );
        const labels = events.map((e) => ({ cause: e.cause, start: e.start, end: e.start + e.length }));
        const m = evaluate(timelineOf(ds), { events: labels });
        const answers = new Set(m.perEvent.flatMap((e) => [e.response?.position, e.revision?.position]).filter((p) => p !== undefined));
        expect(answers.size + m.repeats + m.falseAlarms).toBe(m.responses.length);
        expect(m.revisions).toBeLessThanOrEqual(m.detected - m.correctCause);
        const runs = m.runLengths;
        expect([...runs.completed, ...runs.censored].reduce((s, x) => s + x, 0)).toBe(runs.exposure);
        expect(runs.completed.length).toBe(m.falseAlarms);
        expect(m.detected + m.missed).toBe(m.events);
        let confusionTotal = 0;
        for (const row of Object.values(m.confusion)) for (const v of Object.values(row)) confusionTotal += v;
        expect(confusionTotal).toBe(m.events + m.falseAlarms);
      }),
      { numRuns: 200 },
    );
  });
});

describe("evaluate: scores and bad input", () => {
  it("computes ROC and PR AUC of live and reference scores outside commissioning", () => {
    const scores = [9, 9, 1, 2, 3, 8, 7, 2];
    const anomaly = [true, true, false, false, false, true, true, false];
    const ds = decisions(8, [{ from: 0, to: 2, action: "learn", cause: "commissioning", phase: "commissioning" }], scores);
    const m = evaluate(timelineOf(ds), { events: [], anomaly });
    expect(m.scores?.samples).toBe(6);
    expect(m.scores?.positives).toBe(2);
    expect(m.scores?.live).toEqual({ rocAuc: 1, prAuc: 1 });
    expect(m.scores?.reference).toEqual({ rocAuc: 1, prAuc: 1 });
  });

  it("gives null areas when only one class remains, and no reference area without reference scores", () => {
    const ds = decisions(4, []).map((d) => ({ ...d, evidence: { liveScore: d.index, referenceScores: [] } }));
    const m = evaluate(timelineOf(ds), { events: [], anomaly: [false, false, true, true] });
    expect(m.scores?.live?.rocAuc).toBe(1);
    expect(m.scores?.reference).toBeNull();
    expect(evaluate(timelineOf(ds), { events: [], anomaly: [false, false, false, false] }).scores?.live).toBeNull();
  });

  it("refuses malformed labels and options, naming what is wrong", () => {
    const t = timelineOf(decisions(10, []));
    expectLeewayError(() => evaluate(t, { events: [{ cause: "drift" as never, start: 1, end: 2 }] }), "E_OPTION", "labels.events[0].cause", "drift");
    expectLeewayError(() => evaluate(t, { events: [{ cause: "anomaly", start: 5, end: 5 }] }), "E_OPTION", "labels.events[0].end", "5");
    expectLeewayError(() => evaluate(t, { events: [{ cause: "anomaly", start: -1, end: 5 }] }), "E_OPTION", "labels.events[0].start", "-1");
    expectLeewayError(() => evaluate(t, { events: [{ cause: "anomaly", start: 1, end: 5, id: 3 as never }] }), "E_OPTION", "labels.events[0].id");
    expectLeewayError(() => evaluate(t, { events: [], anomaly: [true] }), "E_DIMENSION", "labels.anomaly", "10", "1");
    expectLeewayError(() => evaluate(t, undefined, { maxDelay: 0 }), "E_OPTION", "maxDelay", "0");
    expectLeewayError(() => evaluate(t, undefined, { level: 1.5 }), "E_OPTION", "level", "1.5");
    expectLeewayError(() => evaluate(t, undefined, { maxdelay: 3 } as never), "E_OPTION", "maxdelay");
  });
});
