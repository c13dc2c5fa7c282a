import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { WindowTrend } from "@leeway/stats";
import { BlockTrend } from "../../packages/policy/src/block-trend.js";
import { throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";

describe("BlockTrend", () => {
  it("equals a WindowTrend fed the block means by hand", () => {
    const t = new BlockTrend(4, 10);
    const w = new WindowTrend({ width: 10 });
    const xs = Array.from({ length: 60 }, (_, i) => Math.sin(i) + i * 0.01);
    for (let i = 0; i < xs.length; i++) {
      const completed = t.observe(xs[i] as number);
      expect(completed).toBe(i % 4 === 3);
      if (completed) w.observe(((xs[i - 3] as number) + (xs[i - 2] as number) + (xs[i - 1] as number) + (xs[i] as number)) / 4);
    }
    expect(t.blocks).toBe(w.size);
    expect(t.z).toBe(w.z);
    expect(t.rise).toBeCloseTo((w.slope() / 4) * 9 * 4, 12);
    expect(t.evidence.slope).toBeCloseTo(w.slope() / 4, 12);
  });

  it("reports a rising ramp with a positive z and a rise close to the ramp's", () => {
    const t = new BlockTrend(10, 50);
    for (let i = 0; i < 500; i++) t.observe(i * 0.002);
    expect(t.z).toBeGreaterThan(5);
    expect(t.rise).toBeCloseTo(0.002 * 49 * 10, 6);
  });

  it("computes the slope only when the rise is asked for (the evidence holds null before, never NaN)", () => {
    const t = new BlockTrend(2, 10);
    expect(t.evidence).toEqual({ blocks: 0, z: 0, pValue: 1, slope: null, rise: null });
    expect(t.rise).toBe(0);
    for (let i = 0; i < 20; i++) t.observe(i);
    expect(t.evidence.slope).toBeNull();
    expect(t.evidence.rise).toBeNull();
    expect(t.pending).toBe(0);
    expect(Array.from(t.means)).toEqual([0.5, 2.5, 4.5, 6.5, 8.5, 10.5, 12.5, 14.5, 16.5, 18.5]);
    t.observe(20);
    expect(t.pending).toBe(1);
    expect(t.rise).toBeCloseTo(18, 12);
    expect(t.evidence.rise).toBeCloseTo(18, 12);
    expect(t.evidence.slope).toBeCloseTo(1, 12);
    expect(t.lastMean).toBe(18.5);
  });

  // (x + 0 turns −0 into +0: JSON, the snapshot's carrier, has no −0)
  it("property: a restored trend continues identically", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -10, max: 10, noNaN: true }).map((x) => x + 0), { minLength: 1, maxLength: 80 }), fc.nat(80), (xs, cut) => {
        const a = new BlockTrend(3, 8);
        let b: BlockTrend | null = null;
        xs.forEach((x, i) => {
          a.observe(x);
          if (b !== null) (b as BlockTrend).observe(x);
          if (i === Math.min(cut, xs.length - 1)) b = BlockTrend.restore(throughJson(a.snapshot()), 3, 8);
        });
        const more = [1, 2, 3, 4, 5, 6];
        for (const x of more) {
          a.observe(x);
          (b as unknown as BlockTrend).observe(x);
          void a.rise;
          void (b as unknown as BlockTrend).rise;
        }
        expect((b as unknown as BlockTrend).evidence).toEqual(a.evidence);
      }),
      { numRuns: 50 },
    );
  });

  it("refuses corrupted snapshots and a block or width other than the engine's", () => {
    const t = new BlockTrend(3, 8);
    for (let i = 0; i < 20; i++) t.observe(Math.cos(i));
    expectRefusesCorruptions((s) => BlockTrend.restore(s, 3, 8), t.snapshot(), { sizePaths: [["block"], ["width"]] });
    expect(() => BlockTrend.restore(throughJson(t.snapshot()), 4, 8)).toThrow(/block/);
  });
});
