import { DimensionError, NonFiniteError, OptionError, finiteArray, requireNumbers } from "@leeway/core";

/**
 * How inputs are scaled before the network sees them: z_j = (x_j − offset_j) / scale_j.
 * - `"none"`: z = x.
 * - `"standardize"`: offset = per-feature mean, scale = per-feature population
 *   standard deviation of the rows given to `fit` (a feature that never varies
 *   gets scale 1); nothing can be learnt or scored before `fit`.
 * - `{ offset, scale }`: given per-feature values (scale > 0).
 */
export type ScalingOption = "none" | "standardize" | { offset: ArrayLike<number>; scale: ArrayLike<number> };

/** The resolved scaling of a model. */
export interface Scaling {
  mode: "none" | "standardize" | "given";
  /** null for "none", and for "standardize" before `fit`. */
  offset: Float64Array | null;
  scale: Float64Array | null;
}

/** Validates the `scaling` option. */
export function scalingOption(component: string, value: unknown, inputs: number): Scaling {
  if (value === undefined || value === "none") return { mode: "none", offset: null, scale: null };
  if (value === "standardize") return { mode: "standardize", offset: null, scale: null };
  if (typeof value !== "object" || value === null || Array.isArray(value)) {
    throw new OptionError(component, "scaling", value, `"none", "standardize" or { offset, scale } with ${inputs} numbers each`);
  }
  const given = value as { offset?: unknown; scale?: unknown };
  const offset = finiteArray(component, "scaling.offset", given.offset, { exactly: inputs });
  const scale = finiteArray(component, "scaling.scale", given.scale, { exactly: inputs });
  for (let j = 0; j < inputs; j++) {
    if (!((scale[j] as number) > 0)) throw new OptionError(component, `scaling.scale[${j}]`, scale[j], "a finite number > 0");
  }
  return { mode: "given", offset, scale };
}

/** Per-feature mean and population standard deviation (1 where it is 0) of the rows. */
export function standardizeFrom(rows: readonly Float64Array[], inputs: number): { offset: Float64Array; scale: Float64Array } {
  const offset = new Float64Array(inputs);
  const scale = new Float64Array(inputs);
  const count = rows.length;
  for (const row of rows) for (let j = 0; j < inputs; j++) offset[j] = (offset[j] as number) + (row[j] as number);
  for (let j = 0; j < inputs; j++) offset[j] = (offset[j] as number) / count;
  for (const row of rows) {
    for (let j = 0; j < inputs; j++) {
      const d = (row[j] as number) - (offset[j] as number);
      scale[j] = (scale[j] as number) + d * d;
    }
  }
  for (let j = 0; j < inputs; j++) {
    const sd = Math.sqrt((scale[j] as number) / count);
    scale[j] = sd > 0 ? sd : 1;
  }
  return { offset, scale };
}

/**
 * Copies x into z, scaled. Throws {@link DimensionError} for a wrong length
 * and SampleError (`E_SAMPLE`, from `requireNumbers`) for an element that is not a number.
 * Returns false (z then undefined) when x holds a non-finite value and
 * `refuse` is false; throws {@link NonFiniteError} when it is true.
 */
export function scaleInto(component: string, parameter: string, x: ArrayLike<number>, z: Float64Array, scaling: Scaling, refuse: boolean): boolean {
  const n = z.length;
  requireNumbers(component, parameter, x, n);
  const offset = scaling.offset;
  const scale = scaling.scale;
  let check = 0;
  if (offset === null || scale === null) {
    for (let j = 0; j < n; j++) {
      const v = x[j] as number;
      z[j] = v;
      check += v * 0;
    }
  } else {
    for (let j = 0; j < n; j++) {
      const v = x[j] as number;
      z[j] = (v - (offset[j] as number)) / (scale[j] as number);
      check += v * 0;
    }
  }
  // check is 0 for finite x and NaN as soon as one element is NaN or ±Infinity.
  if (check === 0) return true;
  if (!refuse) return false;
  for (let j = 0; j < n; j++) {
    const v = x[j];
    if (typeof v !== "number" || !Number.isFinite(v)) throw new NonFiniteError(component, `${parameter}[${j}]`, v);
  }
  return true;
}
