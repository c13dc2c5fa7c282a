import { describe, expect, it } from "vitest";
import { DecisionEngine, limitEvidence, type Decision, type LimitDecisionEvidence } from "@leeway/policy";
import { DegradationMonitor } from "../../packages/policy/src/degradation-monitor.js";
import { LimitWatch } from "../../packages/policy/src/limit-watch.js";
import { throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";
import { QUICK, runHost, ScoreHost, type World } from "./score-streams.js";

const means = Float64Array.from({ length: 40 }, (_, i) => 0.05 * i + 0.02 * Math.sin(7 * i));
const LEVEL = { mean: 0, spread: 1 };
const ramp = (start: number, per: number) => (t: number): World => ({ mode: 0, degradation: t > start ? (t - start) * per : 0, fault: 0 });

describe("LimitWatch", () => {
  it("the @example: 1228 samples to the limit, 12 278 s at 10 s per sample", () => {
    const w = new LimitWatch({ limit: Math.exp(3), trendBlock: 60, scoreFloor: 1e-12, scoreClip: 6, samplePeriod: 10 });
    const e = w.evidence(means, 2399, 2399, LEVEL);
    expect(e.status === "estimated" ? [Math.round(e.expected), Math.round(e.seconds?.expected ?? 0)] : e.status).toEqual([1228, 12278]);
  });

  it("between blocks equals limitEvidence asked at the current sample (times from now, the same crossing), and seconds are samples × period", () => {
    const w = new LimitWatch({ limit: Math.exp(3), trendBlock: 60, scoreFloor: 1e-12, scoreClip: 6, samplePeriod: 2.5 });
    for (const elapsed of [0, 1, 30, 59]) {
      const kept = w.evidence(means, 2399, 2399 + elapsed, LEVEL);
      const direct = limitEvidence({ means, blockLength: 60, index: 2399 + elapsed, sinceLastBlock: elapsed, limit: Math.exp(3), level: LEVEL, scoreFloor: 1e-12, scoreClip: 6 });
      if (kept.status !== "estimated" || direct.status !== "estimated") throw new Error(`${kept.status} ${direct.status}`);
      expect(kept.expected).toBeCloseTo(direct.expected, 9);
      expect(kept.earliest).toBeCloseTo(direct.earliest, 9);
      expect(kept.latest).toBeCloseTo(direct.latest, 9);
      expect(kept.crossingIndex).toBe(direct.crossingIndex);
      expect(kept.seconds).toEqual({ expected: kept.expected * 2.5, earliest: kept.earliest * 2.5, latest: kept.latest * 2.5 });
    }
  });

  it("without a sample period the times stay in samples (seconds null); a refusal carries its reason", () => {
    const w = new LimitWatch({ limit: Math.exp(3), trendBlock: 60, scoreFloor: 1e-12, scoreClip: 6, samplePeriod: null });
    expect(w.evidence(means, 2399, 2400, LEVEL).seconds).toBeNull();
    const flat = new LimitWatch({ limit: Math.exp(3), trendBlock: 60, scoreFloor: 1e-12, scoreClip: 6, samplePeriod: 10 });
    const e = flat.evidence(new Float64Array(40).fill(0.1), 2399, 2399, LEVEL);
    expect(e.status === "refused" ? [e.reason, e.seconds] : e.status).toEqual(["no-significant-trend", null]);
  });
});

describe("the engine's degradation decisions with a limit", () => {
  const options = { ...QUICK, seed: 1, limit: 0.06, samplePeriod: 10 } as const;

  it("tell the time to the limit in every degradation decision (none in others), in samples and seconds, and change no decision", () => {
    const withLimit = runHost(new DecisionEngine(options), new ScoreHost(3), ramp(3000, 1 / 8000), 9000, { acknowledgeAfter: 20 });
    const without = runHost(new DecisionEngine({ ...QUICK, seed: 1, samplePeriod: 10 }), new ScoreHost(3), ramp(3000, 1 / 8000), 9000, { acknowledgeAfter: 20 });
    const strip = (d: Decision): string => JSON.stringify({ ...d, evidence: { ...d.evidence, limit: undefined } });
    expect(withLimit.decisions.map(strip)).toEqual(without.decisions.map(strip));
    const degradation = withLimit.decisions.filter((d) => d.cause === "degradation");
    expect(degradation.length).toBeGreaterThan(100);
    expect(degradation.every((d) => d.evidence.limit !== undefined)).toBe(true);
    expect(withLimit.decisions.filter((d) => d.cause !== "degradation" && d.evidence.limit !== undefined)).toEqual([]);
    const estimated = degradation.map((d) => d.evidence.limit as LimitDecisionEvidence).filter((e) => e.status === "estimated");
    expect(estimated.length).toBeGreaterThan(0);
    for (const e of estimated) {
      expect(e.earliest).toBeLessThanOrEqual(e.expected);
      expect(e.expected).toBeLessThanOrEqual(e.latest);
      expect(e.seconds?.expected).toBeCloseTo(e.expected * 10, 9);
    }
  });

  it("a restored engine reports the same time to the limit to the last bit (the kept answer is computed again)", () => {
    const a = new DecisionEngine(options);
    const host = new ScoreHost(3);
    const world = ramp(3000, 1 / 8000);
    let b: DecisionEngine | null = null;
    const tail: [string, string][] = [];
    for (let t = 0; t < 7000; t++) {
      const { live, references } = host.score(world(t));
      const da = a.observeScores(live, references);
      if (b !== null) tail.push([JSON.stringify(da), JSON.stringify(b.observeScores(live, references))]);
      if (da.action === "alarm") a.acknowledge();
      if (da.action === "alarm" && b !== null) b.acknowledge();
      if (t === 6000) b = DecisionEngine.restore(throughJson(a.snapshot()));
    }
    expect(tail.filter(([x]) => x.includes('"limit"')).length).toBeGreaterThan(0);
    expect(tail.filter(([x, y]) => x !== y)).toEqual([]);
  });

  it("the degradation monitor's snapshot keeps where the latest block ended and refuses one that contradicts its trend", () => {
    const settings = { trendBlock: 10, trendWindow: 50, trendZ: 3.09, trendWarnZ: 2.33, trendClearZ: 1.64, trendMinRise: 0.5, trendMinBlocks: 20, confirmShift: 1, limit: 0, scoreFloor: 1e-12, scoreClip: 6, samplePeriod: null };
    const m = new DegradationMonitor(settings);
    for (let i = 0; i < 500; i++) m.observe(i * 0.01, 0, i);
    expect(m.strength()).toBe(2);
    expect((m.snapshot().state as { lastBlockAt: number }).lastBlockAt).toBe(499);
    expectRefusesCorruptions((s) => DegradationMonitor.restore(s, settings), m.snapshot());
    const fresh = throughJson(new DegradationMonitor(settings).snapshot()) as { state: { lastBlockAt: number } };
    fresh.state.lastBlockAt = 5;
    expect(() => DegradationMonitor.restore(fresh, settings)).toThrow(/lastBlockAt/);
  });
});
