import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { limitEvidence, type LimitEvidenceInput } from "@leeway/policy";
import { senSlopeInterval, timeToLimit } from "@leeway/stats";
import { expectLeewayError } from "../support/errors.js";

const UNIT = { level: { mean: 0, spread: 1 }, scoreFloor: 1e-12, scoreClip: 6 } as const;
const wave = (i: number): number => 0.02 * Math.sin(7 * i);
const rising = Array.from({ length: 40 }, (_, i) => 0.05 * i + wave(i));

function input(means: ArrayLike<number>, overrides: Partial<LimitEvidenceInput> = {}): LimitEvidenceInput {
  return { means, blockLength: 60, index: 2399, limit: Math.exp(3), ...UNIT, ...overrides };
}

describe("limitEvidence", () => {
  it("the @example: 40 blocks of 60 samples rising 0.05 σ per block reach 3 σ in about 1228 samples", () => {
    const e = limitEvidence(input(rising));
    expect(e.status).toBe("estimated");
    if (e.status !== "estimated") return;
    expect([e.expected, e.earliest, e.latest].map(Math.round)).toEqual([1228, 1210, 1246]);
    expect(e.crossingIndex).toBe(Math.round(2399 + e.expected));
  });

  it("is timeToLimit at one step per block, counted from the current sample: the latest mean stands at its block's centre (same arithmetic, by hand)", () => {
    const t = timeToLimit(rising, { limit: 3, step: 60 });
    if (t.status !== "estimated") throw new Error(t.status);
    for (const since of [0, 17]) {
      const e = limitEvidence(input(rising, { sinceLastBlock: since, index: 2399 + since }));
      if (e.status !== "estimated") throw new Error(e.status);
      const behind = since + 59 / 2;
      expect(e.expected).toBeCloseTo(t.expected - behind, 9);
      expect(e.earliest).toBeCloseTo(t.earliest - behind, 9);
      expect(e.latest).toBeCloseTo(t.latest - behind, 9);
      // the crossing is one sample index whenever it is asked
      expect(e.crossingIndex).toBe(Math.round(2399 - 59 / 2 + t.expected));
      expect(e.slope).toBeCloseTo(t.slope, 15);
    }
  });

  it("puts a limit in score units on the trend's scale: (ln(limit + floor) − μ)/σ", () => {
    const level = { mean: Math.log(0.05), spread: 0.3 };
    const limit = Math.exp(Math.log(0.05) + 0.3 * 3);
    const e = limitEvidence(input(rising, { level, limit, scoreFloor: 1e-12 }));
    expect(e.limitSigma).toBeCloseTo(3, 9);
    expect(e.status).toBe("estimated");
  });

  it("stated 90 % intervals cover the true crossing in 85–95 % of 400 simulated streams (per-sample normalised scores, linear rise, blocks of 10; Monte Carlo, common practice, no source)", () => {
    const B = 10;
    const W = 60;
    const slope = 0.004; // σ per sample
    const start = 0.2;
    const zLimit = 5;
    const level = { mean: Math.log(0.05), spread: 0.3 };
    const limit = Math.exp(level.mean + level.spread * zLimit) - 1e-12;
    const trueCrossing = (zLimit - start) / slope; // 1200
    let covered = 0;
    let estimated = 0;
    const runs = 400;
    for (let r = 0; r < runs; r++) {
      const rng = new RandomSource(`limit-coverage-${r}`);
      const since = r % B; // asked at any point of a block
      const n = B * W + since;
      const means = new Float64Array(W);
      for (let t = 0; t < n; t++) {
        const score = Math.exp(level.mean + level.spread * (start + slope * t + rng.normal()));
        const z = Math.min(6, (Math.log(score + 1e-12) - level.mean) / level.spread); // the engine's normalisation and clip
        if (t < B * W) means[Math.floor(t / B)] = (means[Math.floor(t / B)] as number) + z / B;
      }
      const e = limitEvidence({ means, blockLength: B, index: n - 1, sinceLastBlock: since, limit, level, scoreFloor: 1e-12, scoreClip: 6 });
      if (e.status !== "estimated") continue;
      estimated++;
      const truth = trueCrossing - (n - 1);
      if (e.earliest <= truth && truth <= e.latest) covered++;
    }
    console.log(`limitEvidence: 90 % interval covered the true crossing in ${covered} of ${estimated} estimates (${runs} streams)`);
    expect(estimated).toBeGreaterThan(0.95 * runs);
    expect(covered / estimated).toBeGreaterThanOrEqual(0.85);
    expect(covered / estimated).toBeLessThanOrEqual(0.95);
  });

  it("reports a line already past the limit as reached", () => {
    const e = limitEvidence(input(rising, { limit: Math.exp(1) }));
    expect(e.status).toBe("reached");
    if (e.status === "reached") expect(e.levelSigma).toBeGreaterThan(1);
  });

  it("refuses with the reason: too few blocks, no trend, not monotone, slope interval holding zero, moving away, limit beyond the clip", () => {
    const reason = (e: ReturnType<typeof limitEvidence>): string => (e.status === "refused" ? e.reason : e.status);
    expect(reason(limitEvidence(input(rising.slice(0, 9))))).toBe("too-few-blocks");
    expect(reason(limitEvidence(input(Array.from({ length: 40 }, (_, i) => wave(i)))))).toBe("no-significant-trend");
    // up for 40 blocks, then down for 20 steeply: the whole rises, the newer half falls
    const peak = Array.from({ length: 60 }, (_, i) => (i < 40 ? 0.05 * i : 2 - 0.08 * (i - 40)) + wave(i));
    expect(reason(limitEvidence(input(peak)))).toBe("not-monotone");
    // one step up after a long flat stretch: Mann-Kendall finds a rise, but most pairwise slopes are 0
    const step = [...new Array<number>(30).fill(0), ...new Array<number>(10).fill(1)];
    const held = limitEvidence(input(step));
    expect(reason(held)).toBe("slope-interval-includes-zero");
    const sen = senSlopeInterval(step);
    if (held.status === "refused") {
      expect(held.slopeLower).toBe(sen.lower / 60);
      expect(held.slopeUpper).toBe(sen.upper / 60);
      expect(held.pValue).toBeLessThan(0.1);
    }
    const falling = rising.map((x) => -x);
    expect(reason(limitEvidence(input(falling)))).toBe("moving-away");
    expect(reason(limitEvidence(input(rising, { limit: Math.exp(6) })))).toBe("limit-beyond-clip");
  });

  it("refuses bad input naming the parameter", () => {
    expectLeewayError(() => limitEvidence(input(rising, { blockLength: 0 })), "E_OPTION", "blockLength");
    expectLeewayError(() => limitEvidence(input(rising, { limit: -1 })), "E_OPTION", "limit");
    expectLeewayError(() => limitEvidence(input(rising, { sinceLastBlock: 60 })), "E_OPTION", "sinceLastBlock");
    expectLeewayError(() => limitEvidence(input([1, Number.NaN, 2])), "E_OPTION", "means[1]");
    expectLeewayError(() => limitEvidence(input(rising, { level: { mean: 0, spread: 0 } })), "E_OPTION", "level.spread");
    expectLeewayError(() => limitEvidence(input(rising, { confidence: 1 })), "E_OPTION", "confidence");
    expectLeewayError(() => limitEvidence({ ...input(rising), extra: 1 } as LimitEvidenceInput), "E_OPTION", "extra");
  });
});
