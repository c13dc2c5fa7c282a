import { optionsObject, positiveInteger, positiveNumber, numberInRange, OptionError } from "@leeway/core";

/** Rolling-element bearing geometry. */
export interface BearingGeometry {
  /** n, the number of rolling elements. */
  balls: number;
  /** d, rolling-element diameter (any length unit, the same as pitchDiameter). */
  ballDiameter: number;
  /** D, pitch diameter (same unit as ballDiameter). */
  pitchDiameter: number;
  /** φ, contact angle in degrees (0 for a deep-groove ball bearing under radial load). */
  contactAngle: number;
}

/** Bearing defect frequencies as multiples ("orders") of the shaft rate f_r. */
export interface BearingOrders {
  /** Ball-pass frequency, outer race: (n/2)·(1 − (d/D)·cos φ). */
  bpfo: number;
  /** Ball-pass frequency, inner race: (n/2)·(1 + (d/D)·cos φ). */
  bpfi: number;
  /** Ball spin frequency: (D/(2d))·(1 − ((d/D)·cos φ)²), one rotation of a ball about its own axis. */
  bsf: number;
  /** Fundamental train (cage) frequency: (1/2)·(1 − (d/D)·cos φ). */
  ftf: number;
}

/**
 * The drive-end bearing of the Harbour Lane PS-2 pump as the simulator
 * models it: a deep-groove ball bearing of the common 6205 size, 9 balls of
 * 7.94 mm on a 39.04 mm pitch circle, contact angle 0.
 */
export const PS2_DRIVE_END_BEARING: Readonly<BearingGeometry> = Object.freeze({ balls: 9, ballDiameter: 7.94, pitchDiameter: 39.04, contactAngle: 0 });

/**
 * Bearing defect frequencies per unit shaft rate by the standard kinematic
 * formulas (rolling without slip, stationary outer race), with ρ = (d/D)·cos φ:
 * BPFO = (n/2)(1 − ρ), BPFI = (n/2)(1 + ρ), FTF = (1/2)(1 − ρ),
 * BSF = (D/2d)(1 − ρ²). BSF here is the ball's spin rate about its own axis;
 * a defect on a ball strikes both races once per spin, so its spectral line
 * often appears at 2·BSF.
 * Method: rolling-bearing kinematics (for example Harris & Kotzalas, Rolling
 * Bearing Analysis; Randall & Antoni, 2011, "Rolling element bearing
 * diagnostics — a tutorial").
 * @example
 * const o = bearingOrders(PS2_DRIVE_END_BEARING);
 * o.bpfo; // ≈ 3.5848 (× shaft rate)
 * o.bsf; // ≈ 2.3568
 */
export function bearingOrders(geometry: BearingGeometry): BearingOrders {
  const g = validateBearing("bearingOrders", "geometry", geometry);
  const rho = (g.ballDiameter / g.pitchDiameter) * Math.cos((g.contactAngle * Math.PI) / 180);
  return {
    bpfo: (g.balls / 2) * (1 - rho),
    bpfi: (g.balls / 2) * (1 + rho),
    bsf: (g.pitchDiameter / (2 * g.ballDiameter)) * (1 - rho * rho),
    ftf: 0.5 * (1 - rho),
  };
}

/** Validates a bearing geometry (used by the scenario builder too). */
export function validateBearing(component: string, option: string, value: unknown): BearingGeometry {
  const o = optionsObject<BearingGeometry>(component, value, ["balls", "ballDiameter", "pitchDiameter", "contactAngle"]);
  if (value === undefined) throw new OptionError(component, option, value, "a bearing geometry { balls, ballDiameter, pitchDiameter, contactAngle }");
  const balls = positiveInteger(component, `${option}.balls`, o.balls, 1000);
  const ballDiameter = positiveNumber(component, `${option}.ballDiameter`, o.ballDiameter);
  const pitchDiameter = positiveNumber(component, `${option}.pitchDiameter`, o.pitchDiameter);
  if (!(ballDiameter < pitchDiameter)) throw new OptionError(component, `${option}.ballDiameter`, ballDiameter, `smaller than pitchDiameter (${pitchDiameter})`);
  // keeps the ball-spin order D/(2d)·(1 − ρ²) below 5·10^5, so defect frequencies stay finite
  if (!(ballDiameter >= pitchDiameter * 1e-6)) throw new OptionError(component, `${option}.ballDiameter`, ballDiameter, `at least pitchDiameter × 1e-6 (${pitchDiameter * 1e-6})`);
  const contactAngle = numberInRange(component, `${option}.contactAngle`, o.contactAngle ?? 0, { min: 0, max: 90, maxExclusive: true });
  return { balls, ballDiameter, pitchDiameter, contactAngle };
}
