import { describe, expect, it } from "vitest";
import { bearingOrders } from "@leeway/sim";
import { expectLeewayError } from "../support/errors.js";

describe("bearing defect frequencies", () => {
  // Deep-groove ball bearing of the 6205 size: 9 balls, d = 7.94 mm, D = 39.04 mm,
  // contact angle 0. Multiples of shaft rate: BPFO 3.5848, BPFI 5.4152,
  // FTF 0.39828, ball spin 4.7135 (= 2 × BSF of the formula used here) —
  // from memory (the standard size's geometry; the same figures are quoted
  // for the drive-end bearing of the bearing data in ../shared/data/cwru-bearing).
  const o = bearingOrders({ balls: 9, ballDiameter: 7.94, pitchDiameter: 39.04, contactAngle: 0 });

  it("BPFO ≈ 3.585 × shaft rate (from memory, 6205 geometry)", () => expect(o.bpfo).toBeCloseTo(3.5848, 3));
  it("BPFI ≈ 5.415 × shaft rate (from memory, 6205 geometry)", () => expect(o.bpfi).toBeCloseTo(5.4152, 3));
  it("BSF ≈ 2.357 × shaft rate, BSF = (D/2d)(1 − (d/D)²cos²φ), the spin of one ball; 2·BSF ≈ 4.7135 (from memory, 6205 geometry)", () => {
    expect(o.bsf).toBeCloseTo(2.357, 3);
    expect(2 * o.bsf).toBeCloseTo(4.7135, 2);
  });
  it("FTF ≈ 0.398 × shaft rate (from memory, 6205 geometry)", () => expect(o.ftf).toBeCloseTo(0.3983, 3));

  it("kinematic identities: BPFO + BPFI = n, BPFO = n·FTF (common practice, no source)", () => {
    expect(o.bpfo + o.bpfi).toBeCloseTo(9, 12);
    expect(o.bpfo).toBeCloseTo(9 * o.ftf, 12);
  });

  it("a contact angle lowers ρ = (d/D)cos φ: BPFO rises towards n/2", () => {
    const angled = bearingOrders({ balls: 9, ballDiameter: 7.94, pitchDiameter: 39.04, contactAngle: 40 });
    expect(angled.bpfo).toBeGreaterThan(o.bpfo);
    expect(angled.bpfo).toBeCloseTo(4.5 * (1 - (7.94 / 39.04) * Math.cos((40 * Math.PI) / 180)), 12);
  });

  it("refuses impossible geometries", () => {
    expectLeewayError(() => bearingOrders({ balls: 0, ballDiameter: 1, pitchDiameter: 5, contactAngle: 0 }), "E_OPTION", "balls");
    expectLeewayError(() => bearingOrders({ balls: 9, ballDiameter: 6, pitchDiameter: 5, contactAngle: 0 }), "E_OPTION", "ballDiameter", "pitchDiameter");
    expectLeewayError(() => bearingOrders({ balls: 9, ballDiameter: 1, pitchDiameter: 5, contactAngle: 90 }), "E_OPTION", "contactAngle");
    expectLeewayError(() => bearingOrders({ balls: 9, ballDiameter: 1, pitchDiameter: -5, contactAngle: 0 }), "E_OPTION", "pitchDiameter");
  });
});
