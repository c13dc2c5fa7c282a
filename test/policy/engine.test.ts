import { describe, expect, it } from "vitest";
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
      [{ settling: 10 }, "settling"],
      [{ settlingLimit: 100 }, "settlingLimit"],
      [{ trendWarnZ: 4 }, "trendWarnZ"],
      [{ trendClearZ: 3 }, "trendClearZ"],
      [{ trendMinBlocks: 1000 }, "trendMinBlocks"],
      [{ retrain: "sometimes" }, "retrain"],
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
    const engine = new DecisionEngine(SMALL);
    const xs = spectra(1000, 1, world);
    const ds: Decision[] = [];
    let ackAt = -1;
    xs.forEach((x, i) => {
      const d = engine.observe(x);
      ds.push(d);
      if (d.action === "alarm") ackAt = i + 5;
      if (i === ackAt) engine.acknowledge();
    });
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
      variableLengthPaths: [["core", "state", "retrainLog"]],
      numRuns: 120,
    });
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

describe("DecisionEngine snapshots in score-only mode", () => {
  it("refuses corrupted snapshots", () => {
    const engine = new DecisionEngine(QUICK);
    runHost(engine, new ScoreHost(3), (t): World => ({ mode: t >= 900 ? 0.2 : 0, degradation: 0, fault: 0 }), 1000, { acknowledgeAfter: 10 });
    expectRefusesCorruptions((s) => DecisionEngine.restore(s), engine.snapshot(), {
      sizePaths: [["core", "state", "settings", "settling"], ["core", "state", "settings", "trendWindow"]],
      variableLengthPaths: [["core", "state", "retrainLog"]],
      numRuns: 150,
    });
  });
});
