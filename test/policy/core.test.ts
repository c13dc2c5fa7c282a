import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { DecisionEngine, type Decision } from "@leeway/policy";
import { expectLeewayError, throughJson } from "../support/errors.js";
import { calm, QUICK, runHost, ScoreHost, type World } from "./score-streams.js";

// The decision core through the score-only engine, on scripted score streams
// (ScoreHost: invented numbers, log-normal scores with AR(1) noise).

const engineWith = (options: Record<string, unknown> = {}): DecisionEngine => new DecisionEngine({ ...QUICK, seed: 1, ...options });
const drift = (at: number, offset = 0.15) => (t: number): World => ({ mode: t >= at ? offset : 0, degradation: 0, fault: 0 });
const count = (ds: Decision[], pred: (d: Decision) => boolean): number => ds.filter(pred).length;

describe("DecisionCore phases", () => {
  it("learns the commissioning window and the calibration span as commissioning, then watches", () => {
    const engine = engineWith();
    const run = runHost(engine, new ScoreHost(2), calm, 700);
    const n = QUICK.commissioning + QUICK.calibration;
    for (const d of run.decisions.slice(0, n)) {
      expect([d.action, d.cause, d.phase]).toEqual(["learn", "commissioning", "commissioning"]);
    }
    expect(run.decisions[n]?.phase).toBe("watching");
    expect(run.decisions.map((d) => d.index)).toEqual(run.decisions.map((_, i) => i));
  });

  it("on a stationary stream learns (almost) everything and raises no alarm (fixed seed, 20 000 samples)", () => {
    const run = runHost(engineWith(), new ScoreHost(7), calm, 20_000);
    expect(run.alarms).toHaveLength(0);
    expect(run.retrains).toHaveLength(0);
    expect(run.learnt.length).toBeGreaterThan(0.9 * 20_000);
  });

  it("property: on stationary streams no alarm and no retrain, for any seed", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1_000_000 }), (seed) => {
        const run = runHost(engineWith({ seed }), new ScoreHost(seed), calm, 6000);
        expect(run.alarms.filter((a) => a.cause === "degradation")).toHaveLength(0);
        expect(run.retrains).toHaveLength(0);
      }),
      { numRuns: 8 },
    );
  });
});

describe("concept drift", () => {
  it("a level shift below the anomaly threshold settles, is retrained exactly once on its own, and nothing alarms afterwards", () => {
    const engine = engineWith();
    const run = runHost(engine, new ScoreHost(3), drift(3000, 0.1), 9000, { acknowledgeAfter: 20 });
    expect(run.alarms).toEqual([]);
    expect(count(run.decisions, (d) => d.action === "await-confirmation")).toBe(0);
    expect(run.retrains).toHaveLength(1);
    const at = run.retrains[0] as number;
    const retrain = run.decisions[at] as Decision;
    expect(retrain.cause).toBe("concept-drift");
    expect(retrain.phase).toBe("retraining");
    // settled first: the decisions just before are settling holds; after the first few samples of the shift
    // (the detection delay) nothing is learnt until the retrain
    expect(run.decisions[at - 1]?.phase).toBe("settling");
    const detected = run.decisions.findIndex((d, t) => t >= 3000 && (d.phase === "settling" || d.phase === "latched"));
    expect(detected - 3000).toBeLessThan(10);
    expect(run.learnt.filter((t) => t >= detected && t <= at)).toHaveLength(0);
    expect((retrain.evidence.settling as { samples: number }).samples).toBeGreaterThanOrEqual(QUICK.settling);
    expect(run.alarms.filter((a) => a.index > at)).toHaveLength(0);
    // after the host's new model is calibrated, the engine learns again against reference 1
    const last = run.decisions[run.decisions.length - 1] as Decision;
    expect([last.action, last.phase, last.evidence.activeReference]).toEqual(["learn", "watching", 1]);
    expect(engine.retrains).toBe(1);
  });

  it("property: for any seed a shift gets exactly one retrain or switch and no alarm after it (the operator confirms when asked), unless degradation evidence already stood", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1_000_000 }), fc.constantFrom(0.1, 0.2, 0.4), (seed, offset) => {
        const run = runHost(engineWith({ seed }), new ScoreHost(seed), drift(2500, offset), 6000, { acknowledgeAfter: 20, confirmAfter: 10 });
        // A degradation warning is a one-sided trend test at p 0.01 run on every block: on a few seeds it stands
        // by chance on the stationary part, and a shift on top of it is then reported as degradation (seed 248945).
        fc.pre(run.decisions.slice(0, 2500).every((d) => d.cause !== "degradation"));
        expect(run.retrains.length + run.switches.length).toBe(1);
        const at = (run.retrains[0] ?? run.switches[0]) as number;
        expect(run.alarms.filter((a) => a.index > at)).toHaveLength(0);
      }),
      { numRuns: 6 },
    );
  });

  it("a return to the commissioning mode is a switch-mode to reference 0, not a retrain", () => {
    const world = (t: number): World => ({ mode: t >= 2500 && t < 5000 ? 0.2 : 0, degradation: 0, fault: 0 });
    const run = runHost(engineWith(), new ScoreHost(5), world, 8000, { acknowledgeAfter: 20, confirmAfter: 10 });
    expect(run.retrains).toHaveLength(1);
    expect(run.switches).toHaveLength(1);
    const sw = run.decisions[run.switches[0] as number] as Decision;
    expect([sw.action, sw.cause, sw.evidence.switchedTo]).toEqual(["switch-mode", "known-mode", 0]);
    expect(sw.index).toBeGreaterThan(5000);
    const last = run.decisions[run.decisions.length - 1] as Decision;
    expect([last.action, last.evidence.activeReference]).toEqual(["learn", 0]);
  });

  it("property: for any seed a return to the commissioning mode is a switch-mode to reference 0, not a second retrain", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1_000_000 }), (seed) => {
        const world = (t: number): World => ({ mode: t >= 2500 && t < 4500 ? 0.2 : 0, degradation: 0, fault: 0 });
        const run = runHost(engineWith({ seed }), new ScoreHost(seed), world, 6500, { acknowledgeAfter: 20, confirmAfter: 10 });
        fc.pre(run.decisions.slice(0, 2500).every((d) => d.cause !== "degradation")); // see the shift property above
        expect(run.retrains).toHaveLength(1);
        expect(run.switches).toHaveLength(1);
        const sw = run.decisions[run.switches[0] as number] as Decision;
        expect([sw.index > 4500, sw.evidence.switchedTo]).toEqual([true, 0]);
      }),
      { numRuns: 6 },
    );
  });

  it('retrain "confirm" emits await-confirmation once and retrains only after confirmRetrain()', () => {
    const engine = engineWith({ retrain: "confirm" });
    let asked = -1;
    const run = runHost(engine, new ScoreHost(3), drift(3000), 6000, {
      acknowledgeAfter: 20,
      onDecision: (d) => {
        if (d.action === "await-confirmation") {
          asked = d.index;
          expect(engine.awaitingConfirmation).toBe(true);
        }
        if (asked >= 0 && d.index === asked + 50) engine.confirmRetrain();
      },
    });
    expect(count(run.decisions, (d) => d.action === "await-confirmation")).toBe(1);
    expect(run.retrains).toEqual([asked + 51]);
    expect(run.learnt.filter((t) => t > asked && t <= asked + 51)).toHaveLength(0);
  });

  it("rejectRetrain() after a drift accepts the new level without a retrain (the reference is calibrated again)", () => {
    const engine = engineWith({ retrain: "confirm" });
    const run = runHost(engine, new ScoreHost(3), drift(3000, 0.1), 7000, {
      acknowledgeAfter: 20,
      onDecision: (d) => {
        if (d.action === "await-confirmation") engine.rejectRetrain();
      },
    });
    expect(run.retrains).toHaveLength(0);
    expect(run.alarms.filter((a) => a.index > 3200)).toHaveLength(0);
    expect(run.decisions[run.decisions.length - 1]?.action).toBe("learn");
  });

  it('retrain "never" raises a concept-drift alarm instead', () => {
    const run = runHost(engineWith({ retrain: "never" }), new ScoreHost(3), drift(3000, 0.1), 5000);
    expect(run.retrains).toHaveLength(0);
    expect(run.alarms.map((a) => a.cause)).toContain("concept-drift");
  });

  it("the retrain budget refuses a retrain past it with a concept-drift alarm naming the budget", () => {
    const world = (t: number): World => ({ mode: t >= 2000 ? (t >= 4500 ? 0.4 : 0.2) : 0, degradation: 0, fault: 0 });
    const run = runHost(engineWith({ retrainBudget: 1 }), new ScoreHost(4), world, 7000, { acknowledgeAfter: 20, confirmAfter: 10 });
    expect(run.retrains).toHaveLength(1);
    const refusal = run.alarms.find((a) => a.evidence.budget !== undefined);
    expect(refusal?.cause).toBe("concept-drift");
    expect(refusal?.evidence.budget).toEqual({ used: 1, allowed: 1, horizon: 86400 });
  });

  it("the cool-down delays a second retrain until it has passed", () => {
    const world = (t: number): World => ({ mode: t >= 2000 ? (t >= 2700 ? 0.4 : 0.2) : 0, degradation: 0, fault: 0 });
    const run = runHost(engineWith({ coolDown: 1500 }), new ScoreHost(4), world, 6000, { acknowledgeAfter: 20, confirmAfter: 10 });
    expect(run.retrains).toHaveLength(2);
    expect((run.retrains[1] as number) - (run.retrains[0] as number)).toBeGreaterThanOrEqual(1500);
  });
});

describe("slow degradation", () => {
  const ramp = (start: number, per: number) => (t: number): World => ({ mode: 0, degradation: t > start ? (t - start) * per : 0, fault: 0 });

  it("raises a degradation alarm, never retrains, and learns nothing once the evidence appears", () => {
    const engine = engineWith();
    const run = runHost(engine, new ScoreHost(3), ramp(3000, 1 / 8000), 9000, { acknowledgeAfter: 20 });
    const first = run.alarms[0] as Decision;
    expect(first.cause).toBe("degradation");
    // before the degradation reached one noise σ of the log score (0.2 in this host): a level that a
    // per-sample threshold (about 3.3 σ) would still miss almost always
    expect((first.index - 3000) / 8000).toBeLessThan(0.2);
    expect(run.retrains).toHaveLength(0);
    const evidenceStart = run.decisions.findIndex((d, t) => t > 3000 && d.cause === "degradation");
    expect(evidenceStart).toBeGreaterThan(3000);
    expect(run.learnt.filter((t) => t >= evidenceStart)).toHaveLength(0);
    const trend = first.evidence.trend as { z: number; pValue: number; slope: number; rise: number };
    expect(trend.z).toBeGreaterThan(0);
    expect(trend.pValue).toBeLessThan(0.05);
  });

  it("property: for any seed a slow rise raises a degradation alarm within 3000 samples of its onset, never retrains, and learns nothing once the evidence appears", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1_000_000 }), (seed) => {
        const run = runHost(engineWith({ seed }), new ScoreHost(seed), ramp(2500, 1 / 8000), 6000, { acknowledgeAfter: 20 });
        const first = run.alarms.find((a) => a.cause === "degradation");
        // 3000 samples of this ramp raise the log score by 0.375: about 1.9 noise σ (0.2) — well below what a
        // per-sample threshold (about 3.3 σ above normal) would catch
        expect(first?.index).toBeGreaterThan(2500);
        expect((first as Decision).index - 2500).toBeLessThan(3000);
        expect(run.retrains).toEqual([]);
        const evidence = run.decisions.findIndex((d, t) => t > 2500 && d.cause === "degradation");
        expect(run.learnt.filter((t) => t >= evidence)).toEqual([]);
      }),
      { numRuns: 6 },
    );
  });

  it("drift, then degradation: one retrain for the drift, then degradation against the new reference", () => {
    const world = (t: number): World => ({ mode: t >= 2000 ? 0.2 : 0, degradation: t > 5000 ? (t - 5000) / 8000 : 0, fault: 0 });
    const run = runHost(engineWith(), new ScoreHost(6), world, 9000, { acknowledgeAfter: 20, confirmAfter: 10 });
    expect(run.retrains).toHaveLength(1);
    const degradation = run.alarms.find((a) => a.cause === "degradation");
    expect(degradation?.index).toBeGreaterThan(5000);
    expect(degradation?.evidence.activeReference).toBe(1);
  });
});

describe("anomalies", () => {
  const fault = (start: number, length: number) => (t: number): World => ({ mode: 0, degradation: 0, fault: t >= start && t < start + length ? 1.2 : 0 });

  it("an abrupt fault raises an anomaly alarm within a few samples, learns none of it, and retrains nothing", () => {
    const run = runHost(engineWith(), new ScoreHost(3), fault(3000, 60), 6000, { acknowledgeAfter: 20 });
    const alarm = run.alarms[0] as Decision;
    expect(alarm.cause).toBe("anomaly");
    expect(alarm.index - 3000).toBeLessThan(QUICK.settling / 10);
    expect(run.learnt.filter((t) => t >= 3000 && t < 3060)).toHaveLength(0);
    expect(run.retrains).toHaveLength(0);
    expect(run.decisions[run.decisions.length - 1]?.action).toBe("learn");
  });

  it("a short run of anomalous samples below the alarm run is held and then learning resumes, without alarm (anomalyExcess 0: the run alone counts)", () => {
    const run = runHost(engineWith({ anomalyExcess: 0 }), new ScoreHost(3), fault(3000, 3), 4000);
    expect(run.alarms).toHaveLength(0);
    expect(run.decisions.slice(3000, 3003).map((d) => d.cause)).toEqual(["anomaly", "anomaly", "anomaly"]);
    expect(run.decisions[3100]?.action).toBe("learn");
  });

  it("a fault shorter than the run alarms when its samples lie far above the threshold (anomalyExcess), a weak one does not, and 0 turns it off", () => {
    const strong = (t: number): World => ({ mode: 0, degradation: 0, fault: t === 3000 ? 3 : 0 });
    const run = runHost(engineWith(), new ScoreHost(3), strong, 3200);
    expect(run.alarms.map((d) => [d.index, d.cause])).toEqual([[3000, "anomaly"]]);
    const excess = (run.alarms[0]?.evidence.anomaly as { excess: number }).excess;
    expect(excess).toBeGreaterThanOrEqual(3);
    // the same sample under anomalyExcess 0 is held and learning resumes (the run of 5 alone counts)
    const runOnly = runHost(engineWith({ anomalyExcess: 0 }), new ScoreHost(3), strong, 3200);
    expect(runOnly.alarms).toEqual([]);
    expect(runOnly.decisions[3000]?.cause).toBe("anomaly");
    // a one-sample fault of 0.6 (in ln score, about 3σ here) stays below the excess: held, no alarm
    const weak = runHost(engineWith(), new ScoreHost(3), (t: number): World => ({ mode: 0, degradation: 0, fault: t === 3000 ? 0.6 : 0 }), 3200);
    expect(weak.alarms).toEqual([]);
  });

  it("the alarm latch stays until acknowledge(), even when the scores are normal again", () => {
    const engine = engineWith();
    const run = runHost(engine, new ScoreHost(3), fault(3000, 30), 4000);
    expect(run.alarms).toHaveLength(1);
    expect(run.decisions.slice(run.alarms[0]!.index).every((d) => d.phase === "latched" && d.action !== "learn")).toBe(true);
    engine.acknowledge();
    expect(engine.phase).toBe("settling");
  });
});

describe("an anomaly acknowledged while it persists (a clog that lasts)", () => {
  const clog = (start: number, length: number) => (t: number): World => ({ mode: 0, degradation: 0, fault: t >= start && t < start + length ? 1.2 : 0 });
  const asked = (run: { decisions: Decision[] }): Decision[] => run.decisions.filter((d) => d.action === "await-confirmation");

  it('asks for confirmation even under retrain "auto", with the reason in the evidence, and retrains only after confirmRetrain()', () => {
    const engine = engineWith();
    let confirmedAt = -1;
    const run = runHost(engine, new ScoreHost(3), clog(3000, 2000), 6000, {
      acknowledgeAfter: 20,
      onDecision: (d, t) => {
        if (d.action === "await-confirmation" && confirmedAt < 0) {
          engine.confirmRetrain();
          confirmedAt = t;
        }
      },
    });
    expect(run.alarms[0]?.cause).toBe("anomaly");
    const question = asked(run);
    expect(question).toHaveLength(1);
    const q = question[0] as Decision;
    expect([q.cause, q.phase]).toEqual(["anomaly", "settling"]);
    expect(q.evidence.outcome).toBe("confirmation needed: the level of an acknowledged anomaly persisted through settling");
    const persistent = q.evidence.persistentAnomaly as { alarmAt: number; settledLevel: number; exitLevel: number };
    expect(persistent.alarmAt).toBe(run.alarms[0]?.index);
    expect(persistent.settledLevel).toBeGreaterThanOrEqual(persistent.exitLevel);
    expect(persistent.exitLevel).toBeGreaterThan(0);
    // the operator says the new level is the new normal: the retrain follows on the next sample
    expect(run.retrains).toEqual([confirmedAt + 1]);
    expect(run.decisions[confirmedAt + 1]?.evidence.confirmed).toBe(true);
    expect(run.learnt.filter((t) => t >= 3000 && t <= confirmedAt + 1)).toEqual([]);
  });

  it("rejectRetrain() keeps holding it; when the scores return to normal the engine watches again, having learnt none of it and retrained nothing", () => {
    const engine = engineWith();
    const run = runHost(engine, new ScoreHost(3), clog(3000, 2000), 7000, {
      acknowledgeAfter: 20,
      onDecision: (d) => {
        if (d.action === "await-confirmation") {
          engine.rejectRetrain();
          expectLeewayError(() => engine.confirmRetrain(), "E_STATE", "confirmRetrain"); // nothing pending any more
        }
      },
    });
    expect(run.retrains).toEqual([]);
    expect(run.learnt.filter((t) => t >= 3000 && t < 5000)).toEqual([]);
    const held = run.decisions.filter((d) => d.index > (asked(run)[0] as Decision).index && d.index < 5000);
    expect(held.every((d) => d.action === "hold" || d.action === "alarm" || d.action === "await-confirmation")).toBe(true);
    expect(held.some((d) => d.evidence.outcome === "held: the operator rejected this level as the new normal")).toBe(true);
    // asked again at most once per settlingLimit after the rejection
    const questions = asked(run).map((d) => d.index);
    for (let i = 1; i < questions.length; i++) expect((questions[i] as number) - (questions[i - 1] as number)).toBeGreaterThan(QUICK.settlingLimit);
    const back = run.decisions.find((d) => d.index >= 5000 && d.evidence.outcome === "returned to normal") as Decision;
    expect(back.action).toBe("learn");
    expect(run.decisions[6999]?.action).toBe("learn");
    expect(run.decisions[6999]?.evidence.activeReference).toBe(0);
    expect(engine.retrains).toBe(0);
  });

  it('persistentAnomaly "as-drift" restores the old behaviour: the persisting level is retrained on without asking', () => {
    const run = runHost(engineWith({ persistentAnomaly: "as-drift" }), new ScoreHost(3), clog(3000, 2000), 6000, { acknowledgeAfter: 20 });
    expect(asked(run)).toEqual([]);
    expect(run.retrains).toHaveLength(1);
    expect(run.retrains[0]).toBeGreaterThan(3000);
    expect(run.retrains[0]).toBeLessThan(5000);
  });

  const clogRejected = (seed: number, length: number): void => {
    const engine = engineWith({ seed });
    let settlingAtOnset = false;
    const run = runHost(engine, new ScoreHost(seed), clog(2500, length), 2500 + length + 200, {
      acknowledgeAfter: 20,
      onDecision: (d) => {
        if (d.index === 2499) settlingAtOnset = d.phase === "settling";
        if (d.action === "await-confirmation") engine.rejectRetrain();
      },
    });
    const alarm = run.alarms[0] as Decision;
    expect(alarm.cause).toBe("anomaly");
    // A change the engine is already settling on holds every sample and judges the clog against the
    // settling window once it is full (seed 88516: a false change 17 samples before the clog).
    expect(alarm.index).toBeLessThan(2500 + 15 + (settlingAtOnset ? QUICK.settling : 0));
    expect(run.retrains).toEqual([]);
    // nothing of it is learnt from the alarm on; before it, only a clog sample that happened to score as
    // normal can have been (seed 761994: its first sample lies at least 2.7 noise σ below its mean)
    expect(run.learnt.filter((t) => t >= alarm.index && t < 2500 + length)).toEqual([]);
    expect(run.learnt.filter((t) => t >= 2500 && t < alarm.index).length).toBeLessThanOrEqual(1);
  };

  it("property: for any seed, a clog acknowledged while it lasts is never learnt or retrained on while the operator rejects it", () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 1_000_000 }), fc.integer({ min: 400, max: 1500 }), clogRejected), { numRuns: 6 });
  });

  it("regression: the counterexample [88516, 400] of a fresh-seed run", () => {
    clogRejected(88516, 400);
  });
});

describe("operator calls at the wrong time", () => {
  it("are refused with E_STATE", () => {
    const engine = engineWith();
    expectLeewayError(() => engine.confirmRetrain(), "E_STATE", "confirmRetrain");
    expectLeewayError(() => engine.rejectRetrain(), "E_STATE", "rejectRetrain");
    expectLeewayError(() => engine.acknowledge(), "E_STATE", "acknowledge", "commissioning");
    expectLeewayError(() => engine.modelReplaced(), "E_STATE", "modelReplaced");
    expectLeewayError(() => engine.startCommissioning(100), "E_STATE", "startCommissioning");
    expectLeewayError(() => engine.observe(new Float64Array(4)), "E_STATE", "observeScores");
  });

  it("are refused with E_STATE at every other wrong moment too, and a refused call changes nothing", () => {
    const engine = engineWith({ retrain: "confirm" });
    const states: string[] = [];
    const snap = (): string => JSON.stringify(engine.snapshot());
    const refuse = (call: () => void, ...mentions: string[]): void => {
      const before = snap();
      expectLeewayError(call, "E_STATE", ...mentions);
      expect(snap()).toBe(before);
    };
    let asked = false;
    runHost(engine, new ScoreHost(3), drift(3000, 0.1), 5000, {
      onDecision: (d) => {
        if (d.phase === "watching" && !states.includes("watching")) {
          states.push("watching");
          refuse(() => engine.acknowledge(), "acknowledge", "watching"); // nothing latched
          refuse(() => engine.confirmRetrain(), "confirmRetrain"); // nothing pending
          refuse(() => engine.rejectRetrain(), "rejectRetrain");
          refuse(() => engine.modelReplaced(), "modelReplaced", "retrain"); // no retrain asked for
        }
        if (d.phase === "settling" && !states.includes("settling")) {
          states.push("settling");
          refuse(() => engine.confirmRetrain(), "confirmRetrain", "settling");
          refuse(() => engine.modelReplaced(), "modelReplaced");
        }
        if (d.action === "await-confirmation" && !asked) {
          asked = true;
          refuse(() => engine.acknowledge(), "acknowledge", "awaiting confirmation");
          refuse(() => engine.modelReplaced(), "modelReplaced");
          engine.confirmRetrain();
          refuse(() => engine.confirmRetrain(), "confirmRetrain"); // confirmed once already
        }
      },
    });
    expect(states).toEqual(["watching", "settling"]);
    expect(asked).toBe(true);
    expect(engine.retrains).toBe(1);
    expectLeewayError(() => engine.startCommissioning(5), "E_OPTION", "n");
    expectLeewayError(() => engine.startCommissioning(1.5e1 + 0.5), "E_OPTION", "n");
  });

  it("feature mode refuses rejectRetrain() with nothing pending and every score-only call", () => {
    const engine = new DecisionEngine({ inputs: 4, hidden: 2, commissioning: 20, calibration: 20, seed: 1 });
    expectLeewayError(() => engine.rejectRetrain(), "E_STATE", "confirmRetrain");
    expectLeewayError(() => engine.modelReplaced(), "E_STATE", "score-only");
    expectLeewayError(() => engine.observeScoresMany(Float64Array.of(1)), "E_STATE", "observe(x)");
    for (let i = 0; i < 10; i++) engine.observe(Float64Array.of(1, 2, 3, 4 + 0.01 * i));
    expectLeewayError(() => engine.acknowledge(), "E_STATE", "acknowledge", "commissioning");
  });

  it("startCommissioning(n) outside commissioning begins a new window and clears a latch", () => {
    const engine = engineWith();
    runHost(engine, new ScoreHost(3), (t) => ({ mode: 0, degradation: 0, fault: t >= 1000 ? 1.2 : 0 }), 1100);
    expect(engine.phase).toBe("latched");
    engine.startCommissioning(50);
    const d = engine.observeScores(0.02);
    expect([d.phase, d.cause]).toEqual(["commissioning", "commissioning"]);
  });
});

describe("snapshots", () => {
  it("property: restored at any point, an engine continues with the same decisions", () => {
    const world = (t: number): World => ({ mode: t >= 1500 ? 0.2 : 0, degradation: t > 3500 ? (t - 3500) / 4000 : 0, fault: t >= 2900 && t < 2920 ? 1.2 : 0 });
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 4800 }), (cut) => {
        const a = engineWith();
        const host = new ScoreHost(9);
        const scores = Array.from({ length: 5000 }, (_, t) => host.score(world(t)));
        let b: DecisionEngine | null = null;
        const ack = (e: DecisionEngine, d: Decision): void => {
          if (d.action === "alarm") e.acknowledge();
          if (d.action === "retrain") e.modelReplaced();
        };
        for (let t = 0; t < 5000; t++) {
          const s = scores[t] as { live: number; references: number[] };
          const da = a.observeScores(s.live, s.references);
          ack(a, da);
          if (t === cut) b = DecisionEngine.restore(throughJson(a.snapshot()));
          if (b !== null && t > cut) {
            const db = b.observeScores(s.live, s.references);
            ack(b, db);
            expect(db).toEqual(da);
          }
        }
        expect(JSON.stringify((b as DecisionEngine).snapshot())).toBe(JSON.stringify(a.snapshot()));
      }),
      { numRuns: 5 },
    );
  });
});
