import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { addModulated, addRinging, addTone } from "../../packages/sim/src/synthesis.js";

describe("tone synthesis", () => {
  it("addTone by recurrence equals amp·sin(φ + ωn) to 1e-9 over 4096 samples", () => {
    fc.assert(
      fc.property(fc.double({ min: 0.001, max: 3.14, noNaN: true }), fc.double({ min: 0, max: 6.28, noNaN: true }), fc.double({ min: 0.01, max: 10, noNaN: true }), (omega, phase, amp) => {
        const buf = new Float64Array(4096);
        addTone(buf, omega, amp, phase);
        for (let n = 0; n < buf.length; n += 97) expect(Math.abs((buf[n] as number) - amp * Math.sin(phase + omega * n))).toBeLessThan(1e-9 * Math.max(1, amp));
      }),
      { numRuns: 40 },
    );
  });

  it("addTone adds (does not overwrite) and skips tones at or above Nyquist", () => {
    const buf = new Float64Array(8).fill(1);
    addTone(buf, Math.PI, 5, 0.3);
    addTone(buf, 4, 5, 0.3);
    expect(Array.from(buf)).toEqual(Array(8).fill(1));
    addTone(buf, Math.PI / 2, 1, Math.PI / 2);
    expect(buf[0]).toBeCloseTo(2, 12);
    expect(buf[2]).toBeCloseTo(0, 12);
  });

  it("addRinging equals amp·r^k·sin(ωk) from its start and decays below 0.1 %", () => {
    const buf = new Float64Array(200);
    const r = 0.9;
    addRinging(buf, 10, 2, 1.1, r);
    for (let k = 0; k < 60; k++) expect(buf[10 + k]).toBeCloseTo(2 * r ** k * Math.sin(1.1 * k), 12);
    for (let i = 0; i < 10; i++) expect(buf[i]).toBe(0);
    expect(buf[199]).toBe(0);
  });
});

describe("amplitude modulation", () => {
  it("addModulated adds src·(1 + m·cos(ωn + φ))", () => {
    const src = Float64Array.from({ length: 300 }, (_, n) => Math.sin(0.7 * n));
    const buf = new Float64Array(300).fill(0.5);
    addModulated(buf, src, 0.05, 0.4, 1.2);
    for (let n = 0; n < 300; n += 7) expect(buf[n]).toBeCloseTo(0.5 + (src[n] as number) * (1 + 0.4 * Math.cos(0.05 * n + 1.2)), 11);
  });
});
