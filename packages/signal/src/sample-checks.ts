import { NonFiniteError, SampleError, requireNumbers } from "@leeway/core";

/**
 * Samples up to this magnitude always give finite spectra, band energies and
 * time features for frames up to 2^24 samples: |X_k| ≤ N·10^140 < 2·10^147,
 * so |X_k|² and its sums stay far below the double range.
 */
export const SIGNAL_SAFE_MAGNITUDE = 1e140;

/**
 * Checks a frame (or spectrum) argument before any arithmetic: a Float64Array
 * or Float32Array passes at once; a plain array must hold numbers only
 * (E_SAMPLE otherwise, naming the element); a wrong length is E_DIMENSION.
 */
export function frameArgument(component: string, parameter: string, frame: unknown, length?: number): ArrayLike<number> {
  return requireNumbers(component, parameter, frame, length);
}

/**
 * Called when a result came out non-finite: throws NonFiniteError naming the
 * first NaN or ±Infinity of the input, or, when every input is finite (the
 * result overflowed), SampleError saying which range always works.
 */
export function refuseNonFiniteResult(component: string, parameter: string, input: ArrayLike<number>, result: string): never {
  let largest = 0;
  for (let i = 0; i < input.length; i++) {
    const x = input[i] as number;
    if (!Number.isFinite(x)) throw new NonFiniteError(component, `${parameter}[${i}]`, x);
    if (Math.abs(x) > largest) largest = Math.abs(x);
  }
  throw new SampleError(component, parameter, largest, `values whose ${result} stays finite (magnitudes up to ${SIGNAL_SAFE_MAGNITUDE} always do; its largest magnitude is shown)`);
}
