import { DimensionError, finiteNumber, positiveNumber } from "@leeway/core";
import { frameArgument, refuseNonFiniteResult } from "./sample-checks.js";

/**
 * Converts spectrum values to decibels relative to `reference`:
 * 10·log10(v/ref) for powers (`kind: "power"`, the default) or
 * 20·log10(v/ref) for amplitudes. Values at or below zero map to `floor` dB
 * (default −300) instead of −∞.
 * Method: the definition of the decibel (common practice, no source).
 * @param values input values (units² for power, units for amplitude)
 * @param options `reference` in the same units (default 1), `kind`, `floor` in dB
 * @param out output (allocated when omitted; may be `values` itself)
 * @example
 * toDecibels(Float64Array.from([1, 10, 100]))[2]; // 20
 * toDecibels(Float64Array.from([10]), { kind: "amplitude" })[0]; // 20
 */
export function toDecibels(
  values: Float64Array,
  options: { reference?: number; kind?: "power" | "amplitude"; floor?: number } = {},
  out: Float64Array = new Float64Array(values.length),
): Float64Array {
  frameArgument("toDecibels", "values", values);
  if (out.length !== values.length) throw new DimensionError("toDecibels", "out", values.length, out.length);
  const reference = options.reference === undefined ? 1 : positiveNumber("toDecibels", "reference", options.reference);
  const factor = options.kind === "amplitude" ? 20 : 10;
  const floor = options.floor === undefined ? -300 : finiteNumber("toDecibels", "floor", options.floor);
  const inv = 1 / reference;
  let check = 0;
  for (let i = 0; i < values.length; i++) {
    const v = (values[i] as number) * inv;
    check += v - v; // NaN once a value is NaN or ±Infinity (never mapped to the floor)
    out[i] = v > 0 ? Math.max(floor, factor * Math.log10(v)) : floor;
  }
  if (check !== 0) refuseNonFiniteResult("toDecibels", "values", values, "ratio to the reference");
  return out;
}
