import { describe, expect, it } from "vitest";
import { ConformalMartingale } from "@leeway/change";
import { RandomSource } from "@leeway/core";
import { DecisionEngine, type Decision } from "@leeway/policy";
import { MachineSimulator, harbourLane } from "@leeway/sim";
import { calibratedThreshold, makeChangeTest, MARTINGALE_BURN_IN, MARTINGALE_THRESHOLD } from "../../packages/policy/src/change-factory.js";
import { expectLeewayError, throughJson } from "../support/errors.js";

/** In-control laws of normalised scores: symmetric, skewed, heavy-tailed, and discrete (ties). */
const LAWS: Record<string, (r: RandomSource) => number> = {
  normal: (r) => r.normal(),
  "exponential − 1": (r) => r.exponential(1) - 1,
  "log-normal σ = 1": (r) => Math.exp(r.normal(0, 1)),
  "rounded normal (ties)": (r) => Math.round(2 * r.normal()) / 2,
};

describe("change test factory: the martingale choice", () => {
  it("the engine's option martingaleThreshold sets the martingale's λ (default 100); a λ of 1 or less is refused", () => {
    const threshold = (options: Record<string, unknown>): unknown => {
      const engine = new DecisionEngine({ commissioning: 50, calibration: 50, changeTest: "martingale", seed: 1, ...options });
      let d: Decision | null = null;
      for (let i = 0; i < 120; i++) d = engine.observeScores(1 + 0.1 * Math.sin(i));
      return (d?.evidence.change as { threshold: number } | undefined)?.threshold;
    };
    expect(threshold({})).toBe(MARTINGALE_THRESHOLD);
    expect(threshold({ martingaleThreshold: 20 })).toBe(20);
    expect(calibratedThreshold("martingale", new Float64Array(300).fill(0.2), 20000, 10, "s", 1000)).toBe(1000);
    expectLeewayError(() => new DecisionEngine({ changeTest: "martingale", martingaleThreshold: 1 }), "E_OPTION", "martingaleThreshold", "1");
  });

  it("makes a two-sided ConformalMartingale with threshold 100 and no calibration run, whatever the scores", () => {
    const test = makeChangeTest("martingale", MARTINGALE_THRESHOLD);
    expect(test).toBeInstanceOf(ConformalMartingale);
    expect(test.name).toBe("ConformalMartingale"); // the @example
    expect(test.threshold).toBe(100);
    // constant scores make the bootstrap refuse to calibrate a CUSUM; the martingale needs none
    expect(calibratedThreshold("martingale", new Float64Array(300).fill(0.2), 20000, 10, "s")).toBe(MARTINGALE_THRESHOLD);
    // both directions: a fall is found as well as a rise
    for (const level of [3, -3]) {
      const t = makeChangeTest("martingale", 20);
      const xs = Float64Array.from({ length: 1000 }, (_, i) => (i < 600 ? Math.sin(i * 1.7) : level + Math.sin(i * 1.7)));
      const at = t.scan(xs);
      expect(at, `level ${level}`).toBeGreaterThanOrEqual(600);
      expect(at, `level ${level}`).toBeLessThan(700);
    }
  });

  it("Ville's bound for the engine's two-sided martingale: on i.i.d. streams of four laws P(any alarm within 2000 tested samples) ≤ 1/λ = 0.1 within 3 binomial standard errors (Ville 1939; Vovk, Nouretdinov & Gammerman 2003, from memory)", () => {
    const runs = 250;
    const bound = 0.1;
    const slack = 3 * Math.sqrt((bound * (1 - bound)) / runs);
    const xs = new Float64Array(MARTINGALE_BURN_IN + 2000);
    const measured: string[] = [];
    for (const [law, draw] of Object.entries(LAWS)) {
      const rng = new RandomSource(`engine-ville-${law}`);
      let alarms = 0;
      for (let r = 0; r < runs; r++) {
        for (let i = 0; i < xs.length; i++) xs[i] = draw(rng);
        if (makeChangeTest("martingale", 1 / bound).scan(xs) >= 0) alarms++;
      }
      measured.push(`${law} ${(alarms / runs).toFixed(3)}`);
      expect(alarms / runs, law).toBeLessThanOrEqual(bound + slack);
    }
    console.log(`engine martingale, λ = 10, ${runs} streams: P(alarm) ${measured.join(", ")} (bound 0.1)`);
  });
});

// The demo scenario at one sample every 10 s, one engine per speed setting, as in
// test/integration/policy.harbour-lane.test.ts, with the martingale as the change test.
const SCALE = 360;
const OPTIONS = { inputs: 256, seed: 1, members: 3, hidden: 16, commissioning: 120, calibration: 120, settling: 90, settlingLimit: 360, trendBlock: 6, coolDown: 180, baselineHalfLife: 180, retrainHorizon: 8640, changeTest: "martingale" } as const;

describe("the engine with changeTest martingale on the Harbour Lane week", () => {
  it("notices the compressor on every speed, alarms the bearing defect as degradation, learns nothing of the clog, and a restored copy continues bit for bit", () => {
    const sim = new MachineSimulator(harbourLane({ scale: SCALE }));
    const engines = new Map<string, DecisionEngine>();
    // the operator's pending calls per engine: acknowledge an alarm and answer a question four samples later
    const pending = new Map<DecisionEngine, { acknowledge: number; answer: number }>();
    const operate = (engine: DecisionEngine, d: Decision, healthy: boolean): void => {
      const p = pending.get(engine) ?? { acknowledge: -1, answer: -1 };
      pending.set(engine, p);
      if (d.action === "alarm") p.acknowledge = d.index + 4;
      if (p.acknowledge === d.index) engine.acknowledge();
      if (d.action === "await-confirmation") p.answer = d.index + 4;
      if (p.answer === d.index && engine.awaitingConfirmation) {
        if (healthy) engine.confirmRetrain();
        else engine.rejectRetrain();
      }
    };
    const tests = new Set<unknown>();
    const driftResponses = new Map<string, number>();
    const degradation = new Map<string, number>();
    let clogLearnt = 0;
    const restoreAt = Math.round(132 * SCALE);
    const copies = new Map<string, DecisionEngine>();
    let compared = 0;
    for (let s = sim.next(); s !== null; s = sim.next()) {
      if (s.index === restoreAt) {
        for (const [mode, e] of engines) {
          const copy = DecisionEngine.restore(throughJson(e.snapshot()));
          copies.set(mode, copy);
          pending.set(copy, { ...(pending.get(e) ?? { acknowledge: -1, answer: -1 }) });
        }
      }
      const mode = s.truth.mode;
      let engine = engines.get(mode);
      if (engine === undefined) engines.set(mode, (engine = new DecisionEngine(OPTIONS)));
      const healthy = s.truth.fault === null;
      const d = engine.observe(s.spectrum);
      operate(engine, d, healthy);
      const copy = copies.get(mode);
      if (copy !== undefined) {
        const c = copy.observe(s.spectrum);
        operate(copy, c, healthy);
        expect(JSON.stringify(c)).toBe(JSON.stringify(d));
        compared++;
      }
      const change = d.evidence["change"] as { test: string } | undefined;
      if (change !== undefined) tests.add(change.test);
      const hour = s.index / SCALE;
      if (hour > 34 && hour < 72 && d.action !== "learn" && d.action !== "hold" && !driftResponses.has(mode)) driftResponses.set(mode, hour);
      if (d.action === "alarm" && d.cause === "degradation" && !degradation.has(mode)) degradation.set(mode, hour);
      if (!healthy && d.action === "learn") clogLearnt++;
    }
    console.log(`martingale engine: first responses to the compressor ${JSON.stringify(Object.fromEntries(driftResponses))}, first degradation alarms ${JSON.stringify(Object.fromEntries(degradation))} (hours)`);
    expect([...tests]).toEqual(["ConformalMartingale"]);
    expect([...driftResponses.keys()].sort()).toEqual(["high", "low", "mid"]);
    expect([...degradation.keys()].sort()).toEqual(["high", "low", "mid"]);
    for (const hour of degradation.values()) expect(hour).toBeGreaterThan(72);
    expect(clogLearnt).toBe(0);
    expect(compared).toBeGreaterThan(30 * SCALE);
    for (const [mode, copy] of copies) expect(JSON.stringify(copy.snapshot()), mode).toBe(JSON.stringify((engines.get(mode) as DecisionEngine).snapshot()));
  });
});
