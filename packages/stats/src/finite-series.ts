import { NonFiniteError, OptionError } from "@leeway/core";

/**
 * A series given to a whole-series function, copied into a Float64Array: anything but an array of
 * numbers is an {@link OptionError} naming `values`, a NaN or ±Infinity a {@link NonFiniteError}
 * naming its position.
 */
export function finiteSeries(component: string, values: ArrayLike<number>): Float64Array {
  if (values === null || typeof values !== "object" || typeof values.length !== "number") {
    throw new OptionError(component, "values", values, "an array of finite numbers");
  }
  const n = values.length;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const v = values[i];
    if (typeof v !== "number") throw new OptionError(component, `values[${i}]`, v, "a finite number");
    if (v - v !== 0) throw new NonFiniteError(component, `values[${i}]`, v);
    out[i] = v;
  }
  return out;
}
