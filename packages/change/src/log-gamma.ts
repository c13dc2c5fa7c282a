/**
 * ln Γ(x) for x > 0. Method: the recurrence ln Γ(x) = ln Γ(x + 1) − ln x up to x ≥ 10, then
 * Stirling's series ln Γ(x) ≈ (x − ½)ln x − x + ½ln 2π + 1/(12x) − 1/(360x³) + 1/(1260x⁵) − 1/(1680x⁷)
 * + 1/(1188x⁹) (Abramowitz & Stegun, 1964, 6.1.41), whose next term is below 2e−14 there.
 * @example
 * logGamma(5).toFixed(12); // "3.178053830348" (ln 24)
 */
export function logGamma(x: number): number {
  let shift = 0;
  while (x < 10) {
    shift += Math.log(x);
    x += 1;
  }
  const inv = 1 / x;
  const inv2 = inv * inv;
  const series = inv * (1 / 12 - inv2 * (1 / 360 - inv2 * (1 / 1260 - inv2 * (1 / 1680 - inv2 / 1188))));
  return (x - 0.5) * Math.log(x) - x + 0.5 * Math.log(2 * Math.PI) + series - shift;
}
