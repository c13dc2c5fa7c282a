import { describe, expect, it } from "vitest";
import { DecisionEngine, type Decision } from "@leeway/policy";
import { SiteShiftNotice, type SiteShiftSituation } from "../../packages/policy/src/site-shift-notice.js";
import { throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";
import { calm, QUICK, runHost, ScoreHost, type World } from "./score-streams.js";

// The site-shift operator event: the notice part, then the score-only engine on scripted score streams
// (ScoreHost: invented numbers). A mode offset stands for the site's new environment: the host's model
// retrained at the new offset scores it as normal again.

const watching: SiteShiftSituation = { index: 500, phase: "watching", settlingStart: -1, latchCause: null, anomalyAlarmAt: -1, degrading: false };
const engineWith = (options: Record<string, unknown> = {}): DecisionEngine => new DecisionEngine({ ...QUICK, seed: 1, ...options });
const shiftAt = (at: number) => (t: number): World => ({ mode: t >= at ? 0.5 : 0, degradation: 0, fault: 0 });
const siteShiftOf = (d: Decision | undefined): string | undefined => (d?.evidence.siteShift as { outcome: string } | undefined)?.outcome;

describe("SiteShiftNotice", () => {
  it("the doc example: a report while watching covers change onsets from the report to the window's end", () => {
    const n = new SiteShiftNotice();
    expect(n.report(watching, 120)).toBe("noted");
    expect([n.covers(499), n.covers(500), n.covers(530), n.covers(620), n.covers(621), n.covers(700)]).toEqual([false, true, true, true, false, false]);
    expect(n.announce()?.outcome).toBe("the next change onset within 120 samples is the site's");
    expect(n.announce()).toBeNull(); // announced once
  });

  it("covers the settling under way from its start, follows it while it lasts, and is spent by a retrain", () => {
    const n = new SiteShiftNotice();
    n.report({ ...watching, phase: "settling", settlingStart: 430 }, 50);
    expect([n.covers(429), n.covers(430), n.covers(551)]).toEqual([false, true, false]);
    n.follow(430, 600); // still settling at 600: the cover lasts
    expect(n.covers(430)).toBe(true);
    expect([n.settlesOn(430, 600, 200), n.settlesOn(430, 700, 200)]).toEqual([true, false]);
    n.spend();
    expect(n.covers(430)).toBe(false);
  });

  it("an anomaly latch raised within the window is cleared into settling; an older one, another latch, commissioning or a standing degradation decline", () => {
    const outcome = (s: Partial<SiteShiftSituation>): [string, boolean, string | undefined] => {
      const n = new SiteShiftNotice();
      const course = n.report({ ...watching, ...s }, 100);
      return [course, n.covers(500), n.announce()?.outcome];
    };
    expect(outcome({ phase: "latched", latchCause: "anomaly", anomalyAlarmAt: 450 })).toEqual(["clear-latch", true, "the anomaly latch of this change cleared into settling: the site shifted"]);
    expect(outcome({ phase: "latched", latchCause: "anomaly", anomalyAlarmAt: 399 })).toEqual(["noted", false, "declined: the latched anomaly began more than 100 samples before the report"]);
    expect(outcome({ phase: "latched", latchCause: "concept-drift" })).toEqual(["noted", false, "declined: a concept-drift alarm is latched"]);
    expect(outcome({ phase: "latched", latchCause: "degradation" })).toEqual(["noted", false, "declined: a degradation warning or alarm of this machine stands; it stays a fault"]);
    expect(outcome({ degrading: true })).toEqual(["noted", false, "declined: a degradation warning or alarm of this machine stands; it stays a fault"]);
    expect(outcome({ phase: "commissioning" })).toEqual(["noted", false, "declined: commissioning learns every sample as normal already"]);
  });

  it("snapshot through JSON restores the same notice; corrupted snapshots are refused", () => {
    const n = new SiteShiftNotice();
    n.report(watching, 120);
    const copy = SiteShiftNotice.restore(throughJson(n.snapshot()), 510);
    expect(copy.snapshot()).toEqual(n.snapshot());
    expect([copy.covers(620), copy.announce()?.outcome]).toEqual([true, "the next change onset within 120 samples is the site's"]);
    expectRefusesCorruptions((s) => SiteShiftNotice.restore(s, 510), n.snapshot());
    const spent = new SiteShiftNotice();
    spent.report(watching, 120);
    spent.spend();
    expect(() => SiteShiftNotice.restore({ ...spent.snapshot(), state: { ...spent.snapshot().state, until: 40 } }, 510)).toThrow(/until/);
    expect(() => SiteShiftNotice.restore(n.snapshot(), 400)).toThrow(/reportedAt/); // reported after the core's last sample
  });
});

describe("DecisionEngine.reportSiteShift", () => {
  it("a site shift reported ahead of the machine's own change: the step settles instead of paging and retrains without asking (retrain confirm)", () => {
    const told = engineWith({ retrain: "confirm" });
    const run = runHost(told, new ScoreHost(4), shiftAt(1500), 2600, { onDecision: (_, t) => t === 1450 && told.reportSiteShift() });
    expect(siteShiftOf(run.decisions[1451])).toBe("the next change onset within 1200 samples is the site's");
    expect(run.alarms).toEqual([]);
    expect(run.decisions.filter((d) => d.action === "await-confirmation")).toEqual([]);
    expect(run.retrains).toHaveLength(1);
    expect((run.retrains[0] as number) > 1500).toBe(true);
    expect(siteShiftOf(run.decisions[run.retrains[0] as number])).toBe("retraining without asking: the site shifted");
    // The same stream untold pages once and waits for the operator.
    const untold = runHost(engineWith({ retrain: "confirm" }), new ScoreHost(4), shiftAt(1500), 2600);
    expect(untold.alarms.map((a) => a.cause)).toEqual(["anomaly"]);
    expect(untold.retrains).toEqual([]);
  });

  it("a site shift reported after the machine's anomaly alarm clears the latch into settling and retrains; nothing is learnt in between", () => {
    const engine = engineWith();
    let reportedAt = -1;
    const run = runHost(engine, new ScoreHost(5), shiftAt(1500), 2600, {
      onDecision: (d, t) => {
        if (d.action === "alarm" && reportedAt < 0) {
          reportedAt = t + 3;
        }
        if (t === reportedAt) {
          engine.reportSiteShift();
          expect(engine.phase).toBe("settling");
        }
      },
    });
    expect(run.alarms.map((a) => a.cause)).toEqual(["anomaly"]);
    expect(siteShiftOf(run.decisions[reportedAt + 1])).toBe("the anomaly latch of this change cleared into settling: the site shifted");
    expect(run.retrains).toHaveLength(1);
    expect(run.learnt.filter((t) => t >= 1500 && t < (run.retrains[0] as number))).toEqual([]);
  });

  it("a machine whose own degradation warning stands declines the report: it learns nothing more, never retrains, and its degradation alarms", () => {
    const engine = engineWith();
    let reportedAt = -1;
    const world = (t: number): World => ({ mode: t >= 5200 ? 0.5 : 0, degradation: t > 3000 ? (t - 3000) / 6000 : 0, fault: 0 });
    const run = runHost(engine, new ScoreHost(3), world, 6500, {
      onDecision: (d, t) => {
        if (reportedAt < 0 && t > 3000 && d.cause === "degradation") {
          reportedAt = t;
          engine.reportSiteShift();
        }
      },
    });
    expect(reportedAt).toBeGreaterThan(3000);
    expect(siteShiftOf(run.decisions[reportedAt + 1])).toBe("declined: a degradation warning or alarm of this machine stands; it stays a fault");
    expect(run.learnt.filter((t) => t >= reportedAt)).toEqual([]);
    expect(run.retrains).toEqual([]);
    expect(run.alarms.some((a) => a.cause === "degradation")).toBe(true);
  });

  it("restore in the middle of a covered change continues bit for bit; a version-4 core snapshot is refused", () => {
    const a = engineWith();
    const host = new ScoreHost(6);
    runHost(a, host, calm, 1400);
    a.reportSiteShift();
    runHost(a, host, shiftAt(0), 30);
    const b = DecisionEngine.restore(throughJson(a.snapshot()));
    const hostB = new ScoreHost(9);
    const hostA = new ScoreHost(9);
    const ra = runHost(a, hostA, shiftAt(0), 600);
    const rb = runHost(b, hostB, shiftAt(0), 600);
    expect(JSON.stringify(rb.decisions)).toBe(JSON.stringify(ra.decisions));
    expect(ra.retrains).toHaveLength(1);
    const old = throughJson(a.snapshot()) as { state: { core: { version: number } } };
    old.state.core.version = 4;
    expect(() => DecisionEngine.restore(old)).toThrow(/version/);
  });
});
