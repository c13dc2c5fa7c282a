/**
 * Plain, slow recomputations from scratch that the stats tests compare the
 * sequential classes with. Written independently of the package's code.
 */

/** Two-pass mean and population / sample variance of `xs`. */
export function twoPass(xs: ArrayLike<number>): { mean: number; variance: number; sampleVariance: number; min: number; max: number } {
  const n = xs.length;
  let sum = 0;
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < n; i++) {
    const x = xs[i] as number;
    sum += x;
    if (x < min) min = x;
    if (x > max) max = x;
  }
  const mean = sum / n;
  let ss = 0;
  let c = 0;
  for (let i = 0; i < n; i++) {
    const d = (xs[i] as number) - mean;
    ss += d * d;
    c += d;
  }
  ss -= (c * c) / n; // the corrected two-pass formula (Chan, Golub & LeVeque 1983)
  return { mean, variance: ss / n, sampleVariance: ss / (n - 1), min, max };
}

/** Mann–Kendall S = Σ_{i<j} sign(x_j − x_i) and the tie term Σ t(t−1)(2t+5) by enumeration. */
export function mannKendallBrute(xs: ArrayLike<number>): { s: number; variance: number } {
  const n = xs.length;
  let s = 0;
  for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) s += Math.sign((xs[j] as number) - (xs[i] as number));
  const groups = new Map<number, number>();
  for (let i = 0; i < n; i++) groups.set(xs[i] as number, (groups.get(xs[i] as number) ?? 0) + 1);
  let ties = 0;
  for (const t of groups.values()) ties += t * (t - 1) * (2 * t + 5);
  return { s, variance: (n * (n - 1) * (2 * n + 5) - ties) / 18 };
}

/** KS D by evaluating both empirical distribution functions at every sample value. */
export function ksBrute(a: ArrayLike<number>, b: ArrayLike<number>): number {
  const all = [...Array.from(a), ...Array.from(b)];
  let d = 0;
  for (const v of all) {
    let fa = 0;
    let fb = 0;
    for (let i = 0; i < a.length; i++) if ((a[i] as number) <= v) fa++;
    for (let i = 0; i < b.length; i++) if ((b[i] as number) <= v) fb++;
    d = Math.max(d, Math.abs(fa / a.length - fb / b.length));
  }
  return d;
}

/** |a − b| ≤ rel·max(|a|, |b|, floor). */
export function closeTo(a: number, b: number, rel: number, floor = 1): boolean {
  return Math.abs(a - b) <= rel * Math.max(Math.abs(a), Math.abs(b), floor);
}
