/** Storage of learnable state: float64 by default, float32 for edge-size state. */
export type Vector = Float64Array | Float32Array;

/** Element type of the learnable state. */
export type Dtype = "float64" | "float32";

/** Every accepted dtype. */
export const DTYPES: readonly Dtype[] = ["float64", "float32"];

/** Bytes per element of a dtype. */
export function bytesPerElement(dtype: Dtype): number {
  return dtype === "float32" ? 4 : 8;
}

/** A zero-filled vector of the dtype. */
export function allocate(dtype: Dtype, length: number): Vector {
  return dtype === "float32" ? new Float32Array(length) : new Float64Array(length);
}
