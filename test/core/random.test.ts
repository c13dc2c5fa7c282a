import fc from "fast-check";
import * as ss from "simple-statistics";
import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { expectLeewayError, throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";

describe("RandomSource", () => {
  it("same seed gives the same stream; different seeds differ", () => {
    const a = new RandomSource(7);
    const b = new RandomSource(7);
    const c = new RandomSource(8);
    const xs = Array.from({ length: 50 }, () => a.next());
    expect(Array.from({ length: 50 }, () => b.next())).toEqual(xs);
    expect(Array.from({ length: 50 }, () => c.next())).not.toEqual(xs);
  });

  it("snapshot/restore through JSON continues bit-identically, mid-pair of normals too", () => {
    fc.assert(
      fc.property(fc.integer(), fc.integer({ min: 0, max: 40 }), (seed, warm) => {
        const a = new RandomSource(seed);
        for (let i = 0; i < warm; i++) a.normal();
        const b = RandomSource.restore(throughJson(a.snapshot()));
        for (let i = 0; i < 20; i++) {
          expect(b.normal()).toBe(a.normal());
          expect(b.next()).toBe(a.next());
          expect(b.exponential(2)).toBe(a.exponential(2));
        }
        expect(b.snapshot()).toEqual(a.snapshot());
      }),
      { numRuns: 50 },
    );
  });

  it("derive gives a reproducible independent stream without advancing the parent", () => {
    const a = new RandomSource("s");
    const before = a.snapshot();
    const d1 = a.derive("sensor-1");
    expect(a.snapshot()).toEqual(before);
    expect(d1.next()).toBe(new RandomSource("s").derive("sensor-1").next());
    expect(d1.seed).toBe("s/sensor-1");
  });

  it("uniforms lie in [0, 1) with mean 1/2, normals have mean 0 and variance 1 (moments by simple-statistics; common practice, no source)", () => {
    const r = new RandomSource(1);
    const u = r.fillUniform(new Float64Array(20000));
    expect(Math.min(...u)).toBeGreaterThanOrEqual(0);
    expect(Math.max(...u)).toBeLessThan(1);
    expect(Math.abs(ss.mean(Array.from(u)) - 0.5)).toBeLessThan(0.01);
    const z = Array.from(r.fillNormal(new Float64Array(20000)));
    expect(Math.abs(ss.mean(z))).toBeLessThan(0.03);
    expect(Math.abs(ss.variance(z) - 1)).toBeLessThan(0.04);
    const ints = Array.from({ length: 1000 }, () => r.integer(6));
    expect(new Set(ints)).toEqual(new Set([0, 1, 2, 3, 4, 5]));
    const e = Array.from({ length: 20000 }, () => r.exponential(4));
    expect(Math.abs(ss.mean(e) - 0.25)).toBeLessThan(0.01);
  });

  it("refuses bad seeds and corrupted snapshots", () => {
    expectLeewayError(() => new RandomSource(Number.NaN), "E_OPTION", "seed");
    const r = new RandomSource(3);
    r.normal();
    expectRefusesCorruptions((s) => RandomSource.restore(s), r.snapshot());
  });
});
