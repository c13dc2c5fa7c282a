import fc from "fast-check";
import { describe, expect, it } from "vitest";
import type { Snapshot } from "@leeway/core";
import { DecisionEngine, type Decision } from "@leeway/policy";
import { expectLeewayError, throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";
import { calm, QUICK, runHost, ScoreHost, type World } from "./score-streams.js";

/** A small feature-mode engine: 8 inputs, 4 hidden units, short spans. */
const SMALL = { inputs: 8, hidden: 4, members: 2, commissioning: 60, calibration: 60, settling: 30, settlingLimit: 300, trendBlock: 5, trendWindow: 30, trendMinBlocks: 5, coolDown: 50, targetArl0: 500, seed: 3 } as const;

/** Invented 8-bin spectra: a level per bin plus noise; `shift` raises the floor (a drift), `bump` one bin (a fault). */
function spectra(n: number, seed: number, at: (t: number) => { shift: number; bump: number }): Float64Array[] {
  let s = seed >>> 0;
  const noise = (): number => {
    s = (s * 1664525 + 1013904223) >>> 0;
    return s / 2 ** 32 - 0.5;
  };
  return Array.from({ length: n }, (_, t) => {
    const { shift, bump } = at(t);
    return Float64Array.from({ length: 8 }, (_, j) => 1 + 0.5 * Math.sin(j) + shift + (j === 3 ? bump : 0) + 0.05 * noise());
  });
}

describe("DecisionEngine options", () => {
  it("refuses each bad option with E_OPTION naming it", () => {
    const bad: [Record<string, unknown>, string][] = [
      [{ commissioning: 5 }, "commissioning"],
      [{ calibration: 1.5 }, "calibration"],
      [{ anomalyQuantile: 1 }, "anomalyQuantile"],
      [{ anomalyMargin: -1 }, "anomalyMargin"],
      [{ anomalyExitMargin: 5 }, "anomalyExitMargin"],
      [{ anomalyRun: 0 }, "anomalyRun"],
      [{ changeTest: "adwin" }, "changeTest"],
      [{ targetArl0: 10 }, "targetArl0"],
      [{ calibrationReplicates: 9 }, "calibrationReplicates"], // calibrateThreshold needs at least 10: refused here, not at the end of commissioning
      [{ settling: 10 }, "settling"],
      [{ settlingLimit: 100 }, "settlingLimit"],
      [{ trendWarnZ: 4 }, "trendWarnZ"],
      [{ trendClearZ: 3 }, "trendClearZ"],
      [{ trendMinBlocks: 1000 }, "trendMinBlocks"],
      [{ retrain: "sometimes" }, "retrain"],
      [{ persistentAnomaly: "auto" }, "persistentAnomaly"],
      [{ retrainBudget: -1 }, "retrainBudget"],
      [{ seed: "" }, "seed"],
      [{ nonFinite: "ignore" }, "nonFinite"],
      [{ baselineHalfLife: 0 }, "baselineHalfLife"],
      [{ scoreFloor: 0 }, "scoreFloor"],
      [{ inputs: 0 }, "inputs"],
      [{ inputs: 8, hidden: 0 }, "hidden"],
      [{ inputs: 8, members: 100 }, "members"],
      [{ inputs: 8, validationShare: 0.9 }, "validationShare"],
      [{ inputs: 8, validationTolerance: 0.5 }, "validationTolerance"],
      [{ inputs: 8, forgetting: 0 }, "forgetting"],
      [{ inputs: 8, hidden: 32, commissioning: 20 }, "commissioning"],
      [{ hidden: 8 }, "hidden"],
      [{ bogus: 1 }, "bogus"],
    ];
    for (const [options, name] of bad) expectLeewayError(() => new DecisionEngine(options), "E_OPTION", "DecisionEngine", name);
  });

  it("has defaults: 600 samples of commissioning and 600 of calibration, then watching", () => {
    const engine = new DecisionEngine();
    for (let i = 0; i < 1200; i++) expect(engine.observeScores(1 + 0.01 * Math.sin(i)).phase).toBe("commissioning");
    expect(engine.observeScores(1).phase).toBe("watching");
    expect(engine.mode).toBe("scores");
  });
});

describe("DecisionEngine input", () => {
  it("refuses bad scores and references", () => {
    const engine = new DecisionEngine(QUICK);
    expectLeewayError(() => engine.observeScores(Number.NaN), "E_NON_FINITE", "live");
    expectLeewayError(() => engine.observeScores(-1), "E_OPTION", "live");
    expectLeewayError(() => engine.observeScores(1, [1, Infinity]), "E_NON_FINITE", "references[1]");
    expectLeewayError(() => engine.observeScores(1, [1, 2, 3]), "E_DIMENSION", "references");
    expectLeewayError(() => engine.observeScores("1" as unknown as number), "E_OPTION", "live");
    expect(engine.index).toBe(-1);
  });

  it('under nonFinite "skip" counts a non-finite sample, holds it, and changes nothing else', () => {
    const a = new DecisionEngine({ ...QUICK, nonFinite: "skip" });
    const b = new DecisionEngine({ ...QUICK, nonFinite: "skip" });
    const host = new ScoreHost(2);
    for (let t = 0; t < 900; t++) {
      const s = host.score(calm());
      if (t === 500) {
        const d = a.observeScores(Number.NaN);
        expect([d.action, d.evidence.skipped]).toEqual(["hold", 1]);
      }
      a.observeScores(s.live, s.references);
      b.observeScores(s.live, s.references);
    }
    expect(a.skipped).toBe(1);
    expect(a.index).toBe(b.index + 1);
  });

  it("feature mode refuses wrong lengths, non-Float64Array samples, non-finite elements and score-only calls", () => {
    const engine = new DecisionEngine(SMALL);
    expectLeewayError(() => engine.observe(new Float64Array(7)), "E_DIMENSION", "x", "8");
    expectLeewayError(() => engine.observe([1, 2] as unknown as Float64Array), "E_OPTION", "x");
    expectLeewayError(() => engine.observe(Float64Array.from({ length: 8 }, (_, i) => (i === 4 ? Number.NaN : 1))), "E_NON_FINITE", "x[4]");
    expectLeewayError(() => engine.observeScores(1), "E_STATE", "observe(x)");
    expectLeewayError(() => engine.modelReplaced(), "E_STATE", "feature mode");
    expect(engine.mode).toBe("features");
  });
});

describe("DecisionEngine in feature mode (small)", () => {
  const world = (t: number) => ({ shift: t >= 400 ? 0.6 : 0, bump: 0 });

  it("commissions, freezes a reference, retrains once after a floor shift and freezes the candidate into the lineage", () => {
    const engine = new DecisionEngine({ ...SMALL, featureSignature: "rules" });
    const xs = spectra(1000, 1, world);
    const ds: Decision[] = [];
    let ackAt = -1;
    xs.forEach((x, i) => {
      const d = engine.observe(x);
      ds.push(d);
      if (d.action === "alarm") ackAt = i + 5;
      if (i === ackAt) engine.acknowledge();
      if (d.action === "await-confirmation") engine.confirmRetrain();
    });
    // The floor rises in every band: read as a change of conditions, settled on and retrained without a page.
    expect(ds.filter((d) => d.action === "await-confirmation" || d.action === "alarm")).toEqual([]);
    expect(ds.some((d) => d.evidence.outcome === "a broadband rise: settling as a change of conditions")).toBe(true);
    expect(ds.filter((d) => d.action === "retrain")).toHaveLength(1);
    expect(engine.references).toBe(2);
    expect(engine.model?.pool.size).toBe(2);
    expect(ds[999]?.evidence.referenceScores).toHaveLength(2);
  });

  it("snapshot and restore in the middle of settling continue bit for bit (models, lineage, tests, buffers)", () => {
    const xs = spectra(1000, 2, world);
    const a = new DecisionEngine(SMALL);
    let b: DecisionEngine | null = null;
    let ackA = -1;
    let ackB = -1;
    xs.forEach((x, i) => {
      const da = a.observe(x);
      if (da.action === "alarm") ackA = i + 5;
      if (i === ackA) a.acknowledge();
      if (b === null && da.phase === "settling" && (da.evidence.settling as { samples: number } | undefined)?.samples === 10) {
        b = DecisionEngine.restore(throughJson(a.snapshot()));
        ackB = ackA;
        return;
      }
      if (b !== null) {
        const db = b.observe(x);
        if (db.action === "alarm") ackB = i + 5;
        if (i === ackB) b.acknowledge();
        expect(db).toEqual(da);
      }
    });
    expect(b).not.toBeNull();
    expect(JSON.stringify((b as unknown as DecisionEngine).snapshot())).toBe(JSON.stringify(a.snapshot()));
  });

  it("refuses corrupted snapshots of a feature-mode engine", () => {
    const engine = new DecisionEngine(SMALL);
    for (const x of spectra(420, 4, world)) engine.observe(x);
    expect(engine.phase).not.toBe("commissioning");
    expectRefusesCorruptions((s) => DecisionEngine.restore(s), engine.snapshot(), {
      sizePaths: [["core", "state", "settings", "settling"], ["core", "state", "settings", "calibration"], ["model", "state", "inputs"]],
      variableLengthPaths: [["core", "state", "gate", "state", "log"], ["core", "state", "change", "state", "recent"]],
      numRuns: 120,
    });
  });
});

describe("DecisionEngine with a full pool", () => {
  /** An operator who acknowledges every alarm 5 samples later and confirms every retrain asked for. */
  function operate(engine: DecisionEngine, xs: Float64Array[], from = 0, until = xs.length): Decision[] {
    const ds: Decision[] = [];
    let ackAt = -1;
    for (let i = from; i < until; i++) {
      const d = engine.observe(xs[i] as Float64Array);
      ds.push(d);
      if (d.action === "alarm") ackAt = i + 5;
      if (i === ackAt) engine.acknowledge();
      if (d.action === "await-confirmation") engine.confirmRetrain();
    }
    return ds;
  }

  it("members: 1 retrains through a drift by replacing its only member, and the return is a switch-mode to the commissioning reference", () => {
    const xs = spectra(1400, 1, (t) => ({ shift: t >= 400 && t < 800 ? 0.6 : 0, bump: 0 }));
    const engine = new DecisionEngine({ ...SMALL, members: 1 });
    const ds = operate(engine, xs);
    const retrains = ds.filter((d) => d.action === "retrain");
    const switches = ds.filter((d) => d.action === "switch-mode");
    expect(retrains).toHaveLength(1);
    expect(retrains[0]?.index).toBeGreaterThan(400);
    expect(retrains[0]?.evidence.member).toEqual({ member: 0, servesReference: 1, replacedReference: 0 });
    expect(switches).toHaveLength(1);
    const sw = switches[0] as Decision;
    expect(sw.index).toBeGreaterThan(800);
    expect([sw.cause, sw.evidence.switchedTo]).toEqual(["known-mode", 0]);
    // no member served the commissioning reference any more: a learning copy of it took the only place
    expect(sw.evidence.member).toEqual({ member: 0, servesReference: 0, replacedReference: 1 });
    expect(ds.some((d) => typeof d.evidence.outcome === "string" && d.evidence.outcome.includes("full"))).toBe(false);
    expect(engine.references).toBe(2);
    expect(engine.model?.pool.size).toBe(1);
    expect(engine.model?.servedReferences).toEqual([0]);
    // back on the first mode it learns again without alarms, and the live member scores like the commissioning reference
    expect(ds.filter((d) => d.action === "alarm" && d.index > sw.index)).toEqual([]);
    const tail = ds.slice(-100);
    expect(tail.every((d) => d.action === "learn" && d.evidence.activeReference === 0)).toBe(true);
    const last = ds[ds.length - 1] as Decision;
    const [commissioningScore] = last.evidence.referenceScores as [number];
    expect(last.evidence.liveScore).toBeLessThan(2 * commissioningScore);
  });

  it("members: 2 over three levels replaces the least recently used member each time the pool is full", () => {
    const level = (t: number): number => (t < 400 ? 0 : t < 800 ? 0.6 : t < 1200 ? 1.2 : 0);
    const xs = spectra(1700, 6, (t) => ({ shift: level(t), bump: 0 }));
    const engine = new DecisionEngine({ ...SMALL, members: 2 });
    const ds = operate(engine, xs);
    const retrains = ds.filter((d) => d.action === "retrain");
    expect(retrains.map((d) => d.evidence.member)).toEqual([
      { member: 1, servesReference: 1, replacedReference: null }, // room for a second member
      { member: 0, servesReference: 2, replacedReference: 0 }, // full: the first level's member was unused longest
    ]);
    const sw = ds.find((d) => d.action === "switch-mode") as Decision;
    // while the return settles, the first level's samples are nearest to the middle level's member (0.6 away,
    // against 1.2): the top level's member is then the one unused longest, and a copy of reference 0 replaces it
    expect([sw.evidence.switchedTo, sw.evidence.member]).toEqual([0, { member: 0, servesReference: 0, replacedReference: 2 }]);
    expect(engine.model?.servedReferences).toEqual([0, 1]);
    expect(ds.slice(-50).every((d) => d.action === "learn")).toBe(true);
  });

  it("restored between the replacement and the return, a members: 1 engine continues bit for bit", () => {
    const xs = spectra(1400, 2, (t) => ({ shift: t >= 400 && t < 800 ? 0.6 : 0, bump: 0 }));
    const a = new DecisionEngine({ ...SMALL, members: 1 });
    const first = operate(a, xs, 0, 700);
    expect(first.filter((d) => d.action === "retrain")).toHaveLength(1);
    const b = DecisionEngine.restore(throughJson(a.snapshot()));
    expect(b.model?.servedReferences).toEqual([1]);
    expect(operate(b, xs, 700)).toEqual(operate(a, xs, 700));
    expect(JSON.stringify(b.snapshot())).toBe(JSON.stringify(a.snapshot()));
  });
});

describe("DecisionEngine never throws from observe for its own state", () => {
  it("a constant score stream calibrates with the white-noise threshold (reported) and still settles on a later shift", () => {
    const engine = new DecisionEngine({ commissioning: 50, calibration: 50, targetArl0: 500, seed: 1 });
    const ds: Decision[] = [];
    for (let i = 0; i < 300; i++) ds.push(engine.observeScores(1));
    const end = ds.find((d) => (d.evidence.calibration as { progress?: number } | undefined)?.progress === 1) as Decision;
    expect((end.evidence.calibration as { changeThresholdFallback?: unknown }).changeThresholdFallback).toEqual(expect.stringContaining("calibrateThreshold"));
    expect(ds[ds.length - 1]?.action).toBe("learn");
    const later: Decision[] = [];
    for (let i = 0; i < 40; i++) later.push(engine.observeScores(1.001));
    expect(later.some((d) => d.phase === "settling" || d.phase === "latched")).toBe(true);
  });

  it("a refused model update holds the sample and reports why instead of throwing", () => {
    const engine = new DecisionEngine({ ...SMALL, members: 1 });
    const xs = spectra(20, 7, () => ({ shift: 0, bump: 0 }));
    for (const x of xs) expect(engine.observe(x).action).toBe("learn"); // commissioning: every sample is learnt
    // A finite sample of absurd magnitude (1e200 per bin) makes the squared reconstruction error overflow: the autoencoder refuses it.
    const absurd = new Float64Array(8).fill(1e200);
    expectLeewayError(() => engine.model?.pool.memberModel(0).learn(absurd), "E_SAMPLE", "overflows");
    const d = engine.observe(absurd);
    expect([d.action, d.phase]).toEqual(["hold", "commissioning"]);
    expect(d.evidence.learning).toEqual({ refused: true, reason: expect.stringContaining("overflows") });
    expect(d.evidence.liveScore).toBe(Number.MAX_VALUE); // an overflowing loss is reported as the largest finite score
    // the engine goes on: the rest of commissioning and the calibration run, and the snapshot stays restorable
    for (const x of spectra(200, 8, () => ({ shift: 0, bump: 0 }))) engine.observe(x);
    expect(engine.phase).toBe("watching");
    expect(() => DecisionEngine.restore(throughJson(engine.snapshot()))).not.toThrow();
  });
});

describe("DecisionEngine under any stream and any operator", () => {
  /** Piecewise streams: segments of a level, a noise amplitude (0: constant) and a length; levels include 0 and 1e300. */
  const segments = fc.array(
    fc.record({ level: fc.constantFrom(0, 1e-9, 0.02, 0.05, 1, 1e300), noise: fc.constantFrom(0, 0.05, 0.3), length: fc.integer({ min: 5, max: 160 }) }),
    { minLength: 3, maxLength: 10 },
  );
  /** What the operator does after each decision, when the call is allowed: nothing, answer, or commission anew. */
  const operator = fc.array(fc.constantFrom("none", "none", "none", "acknowledge", "confirm", "reject", "commission"), { minLength: 50, maxLength: 50 });
  const act = (engine: DecisionEngine, what: string): void => {
    if (what === "acknowledge" && engine.phase === "latched") engine.acknowledge();
    if (what === "confirm" && engine.awaitingConfirmation) engine.confirmRetrain();
    if (what === "reject" && engine.awaitingConfirmation) engine.rejectRetrain();
    if (what === "commission" && engine.phase !== "commissioning") engine.startCommissioning(30);
  };

  it("property: observeScores and observe never throw for the engine's own state, whatever the scores or spectra and whatever allowed operator calls come between", () => {
    fc.assert(
      fc.property(
        segments,
        operator,
        fc.constantFrom("auto", "confirm", "never"),
        fc.constantFrom("confirm", "as-drift"),
        fc.integer({ min: 1, max: 3 }),
        fc.integer({ min: 0, max: 1000 }),
        (parts, calls, retrain, persistentAnomaly, members, seed) => {
          const options = { commissioning: 40, calibration: 30, settling: 20, settlingLimit: 80, trendBlock: 3, trendWindow: 20, trendMinBlocks: 5, coolDown: 20, targetArl0: 200, calibrationReplicates: 10, retrain, persistentAnomaly, seed } as const;
          const scores = new DecisionEngine(options);
          const features = new DecisionEngine({ ...options, inputs: 4, hidden: 3, members });
          let t = 0;
          let wave = seed;
          for (const part of parts) {
            for (let i = 0; i < part.length; i++, t++) {
              wave = (wave * 1103515245 + 12345) % 2147483648;
              const jitter = part.noise * (wave / 2147483648 - 0.5);
              const score = Math.min(Number.MAX_VALUE, part.level * (1 + jitter));
              const what = calls[t % calls.length] as string;
              const d = scores.observeScores(score, [score * (1 + jitter / 2)]);
              if (d.action === "retrain") scores.modelReplaced();
              act(scores, what);
              const x = Float64Array.from({ length: 4 }, (_, j) => Math.min(1e300, part.level * (1 + jitter * (j + 1))));
              features.observe(x);
              act(features, what);
            }
          }
          expect(scores.index).toBe(t - 1);
          expect(features.index).toBe(t - 1);
          expect(() => DecisionEngine.restore(throughJson(features.snapshot()))).not.toThrow();
          expect(() => DecisionEngine.restore(throughJson(scores.snapshot()))).not.toThrow();
        },
      ),
      { numRuns: 25 },
    );
  });
});

describe("DecisionEngine batch paths", () => {
  it("observeMany and observeScoresMany reach the same decisions and state as one call per sample", () => {
    const xs = spectra(300, 5, (t) => ({ shift: t >= 200 ? 0.6 : 0, bump: 0 }));
    const a = new DecisionEngine(SMALL);
    const b = new DecisionEngine(SMALL);
    const one = xs.map((x) => a.observe(x));
    expect(b.observeMany(xs)).toEqual(one);
    expect(JSON.stringify(b.snapshot())).toBe(JSON.stringify(a.snapshot()));
    const live = Float64Array.from({ length: 700 }, (_, i) => 0.02 * (1 + 0.1 * Math.sin(i * 1.7)));
    const refs = Array.from(live, (v) => [v * 1.05]);
    const c = new DecisionEngine(QUICK);
    const d = new DecisionEngine(QUICK);
    const single = Array.from(live, (v, i) => c.observeScores(v, refs[i]));
    expect(d.observeScoresMany(live, refs)).toEqual(single);
  });
});

describe("DecisionEngine snapshots: cross-checks between fields", () => {
  type Json = Record<string, unknown>;
  const mutated = (snapshot: unknown, path: string[], value: unknown): Json => {
    const copy = throughJson(snapshot) as Json;
    let at: Json = copy;
    for (const key of path.slice(0, -1)) at = at[key] as Json;
    at[path[path.length - 1] as string] = value;
    return copy;
  };

  it("refuses a feature-mode snapshot whose pool, lineage and served references disagree", () => {
    const xs = spectra(700, 1, (t) => ({ shift: t >= 400 ? 0.6 : 0, bump: 0 }));
    const engine = new DecisionEngine({ ...SMALL, members: 2 });
    let ackAt = -1;
    xs.forEach((x, i) => {
      const d = engine.observe(x);
      if (d.action === "alarm") ackAt = i + 5;
      if (i === ackAt) engine.acknowledge();
      if (d.action === "await-confirmation") engine.confirmRetrain();
    });
    expect(engine.model?.servedReferences).toEqual([0, 1]);
    const good = engine.snapshot();
    const served = ["state", "model", "state", "served"];
    for (const bad of [[0], [0, 1, -1], [1, 1], [0, 2], [0, -2], [0, 0.5]]) {
      expectLeewayError(() => DecisionEngine.restore(mutated(good, served, bad)), "E_SNAPSHOT", "served");
    }
    expectLeewayError(() => DecisionEngine.restore(mutated(good, ["state", "model", "version"], 1)), "E_SNAPSHOT", "version");
    expectLeewayError(() => DecisionEngine.restore(mutated(good, ["state", "core", "version"], 1)), "E_SNAPSHOT", "version");
    const lineage = (good.state.model as { state: { lineage: unknown[] } }).state.lineage;
    expectLeewayError(() => DecisionEngine.restore(mutated(good, ["state", "model", "state", "lineage"], [lineage[0]])), "E_SNAPSHOT", "lineage");
    // the untouched snapshot restores and continues
    const restored = DecisionEngine.restore(throughJson(good));
    expect(restored.model?.servedReferences).toEqual([0, 1]);
  });

  it("refuses a core whose phase, latch, confirmation and anomaly-settling fields contradict each other", () => {
    const engine = new DecisionEngine({ ...QUICK, seed: 4 });
    let snapshotWhileAsked: Snapshot | null = null;
    runHost(engine, new ScoreHost(3), (t): World => ({ mode: 0, degradation: 0, fault: t >= 3000 ? 1.2 : 0 }), 3300, {
      acknowledgeAfter: 20,
      onDecision: (d) => {
        if (d.action === "await-confirmation" && snapshotWhileAsked === null) snapshotWhileAsked = engine.snapshot();
      },
    });
    expect(snapshotWhileAsked).not.toBeNull();
    const asked = snapshotWhileAsked as unknown as Snapshot;
    const core = ["state", "core", "state"];
    const gate = [...core, "gate", "state"];
    const settling = [...core, "settling", "state"];
    const cases: [string[], unknown, string][] = [
      [[...core, "phase"], "watching", "settling"], // held after an anomaly, but not settling
      [[...gate, "pending"], false, "confirmed"],
      [[...core, "latchCause"], "anomaly", "latchCause"],
      [[...core, "anomalyAlarmAt"], 10 ** 9, "anomalyAlarmAt"],
      [[...gate, "askAfter"], -1, "askAfter"],
      [[...settling, "afterAnomaly"], "yes", "afterAnomaly"],
    ];
    const withConfirmed = mutated(asked, [...gate, "confirmed"], true);
    for (const [path, value, named] of cases) {
      const base = path[path.length - 1] === "pending" ? withConfirmed : asked;
      expectLeewayError(() => DecisionEngine.restore(mutated(base, path, value)), "E_SNAPSHOT", named);
    }
    expectRefusesCorruptions((s) => DecisionEngine.restore(s), asked, {
      sizePaths: [["core", "state", "settings", "settling"], ["core", "state", "settings", "calibration"]],
      variableLengthPaths: [["core", "state", "gate", "state", "log"], ["core", "state", "change", "state", "recent"]],
      numRuns: 80,
    });
  });

  it("restored while it asks about a persisting anomaly, an engine continues bit for bit through the answer", () => {
    const world = (t: number): World => ({ mode: 0, degradation: 0, fault: t >= 3000 && t < 4200 ? 1.2 : 0 });
    const host = new ScoreHost(3);
    const scores = Array.from({ length: 4800 }, (_, t) => host.score(world(t)));
    /** The operator: acknowledges 20 samples after an alarm, rejects every question at once. */
    const operator = (e: DecisionEngine) => {
      let ackAt = -1;
      return (d: Decision, t: number): void => {
        if (d.action === "alarm") ackAt = t + 20;
        if (t === ackAt) e.acknowledge();
        if (d.action === "await-confirmation") e.rejectRetrain();
      };
    };
    const a = new DecisionEngine({ ...QUICK, seed: 4 });
    const answerA = operator(a);
    let b: DecisionEngine | null = null;
    let answerB: ((d: Decision, t: number) => void) | null = null;
    let compared = 0;
    scores.forEach((s, t) => {
      const da = a.observeScores(s.live, s.references);
      if (b !== null && answerB !== null) {
        const db = b.observeScores(s.live, s.references);
        expect(db).toEqual(da);
        answerB(db, t);
        compared++;
      }
      if (da.action === "await-confirmation" && b === null) {
        // restored before the operator answers; the copy gets the same answer
        b = DecisionEngine.restore(throughJson(a.snapshot()));
        b.rejectRetrain();
        answerB = operator(b);
      }
      answerA(da, t);
    });
    expect(compared).toBeGreaterThan(1000);
    expect(JSON.stringify((b as unknown as DecisionEngine).snapshot())).toBe(JSON.stringify(a.snapshot()));
    expect(a.retrains).toBe(0);
    expect(a.phase).toBe("watching");
  });
});

describe("DecisionEngine snapshots in score-only mode", () => {
  it("refuses corrupted snapshots", () => {
    const engine = new DecisionEngine(QUICK);
    runHost(engine, new ScoreHost(3), (t): World => ({ mode: t >= 900 ? 0.2 : 0, degradation: 0, fault: 0 }), 1000, { acknowledgeAfter: 10 });
    expectRefusesCorruptions((s) => DecisionEngine.restore(s), engine.snapshot(), {
      sizePaths: [["core", "state", "settings", "settling"], ["core", "state", "settings", "trendWindow"]],
      variableLengthPaths: [["core", "state", "gate", "state", "log"], ["core", "state", "change", "state", "recent"]],
      numRuns: 150,
    });
  });
});
