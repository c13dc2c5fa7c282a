import { DimensionError, OptionError, SampleError, integerInRange, oneOf } from "@leeway/core";
import { frameArgument, refuseNonFiniteResult } from "./sample-checks.js";

/** How {@link reduceBins} combines the values of one group: their mean or their sum. */
export type BinReduction = "mean" | "sum";

/**
 * Reduces L spectrum values to B groups of adjacent values: group b holds
 * input indices [⌊b·L/B⌋, ⌊(b+1)·L/B⌋), and its output is their mean
 * (amplitudes, levels) or their sum (powers: the sum is the band's energy).
 * With L a multiple of B every group holds L/B values, for example the
 * first 512 bins of a 1024-point spectrum to 256 groups of 2 bins.
 * Method: common practice (bin averaging), no source.
 * @param values the L input values
 * @param bins B, 1 ≤ B ≤ L
 * @param given B output values (allocated when omitted)
 * @param how `"mean"` (default) or `"sum"`
 * @example
 * reduceBins(Float64Array.from([1, 3, 5, 7]), 2); // Float64Array [2, 6]
 */
export function reduceBins(values: Float64Array, bins: number, given?: Float64Array, how: BinReduction = "mean"): Float64Array {
  const length = frameArgument("reduceBins", "values", values).length;
  if (length === 0) throw new OptionError("reduceBins", "values", values, "a non-empty Float64Array");
  const b = integerInRange("reduceBins", "bins", bins, 1, length);
  const out = given ?? new Float64Array(b);
  if (!(out instanceof Float64Array)) throw new SampleError("reduceBins", "out", out, "a Float64Array");
  if (out.length !== b) throw new DimensionError("reduceBins", "out", b, out.length);
  const mean = oneOf("reduceBins", "how", how, ["mean", "sum"] as const) === "mean";
  let check = 0;
  if (length % b === 0) {
    const width = length / b;
    const scale = mean ? 1 / width : 1;
    for (let g = 0, i = 0; g < b; g++) {
      let s = 0;
      for (let end = i + width; i < end; i++) s += values[i] as number;
      out[g] = s * scale;
      check += s - s; // NaN once a group's sum is NaN or ±Infinity
    }
  } else {
    for (let g = 0; g < b; g++) {
      const from = Math.floor((g * length) / b);
      const to = Math.floor(((g + 1) * length) / b);
      let s = 0;
      for (let i = from; i < to; i++) s += values[i] as number;
      out[g] = mean ? s / (to - from) : s;
      check += s - s;
    }
  }
  if (check !== 0) refuseNonFiniteResult("reduceBins", "values", values, "group sums");
  return out;
}
