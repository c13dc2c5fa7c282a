import { finiteSamples, OptionError } from "@leeway/core";

/** What {@link ksTwoSample} returns. */
export interface KsResult {
  /** D = sup_x |F_a(x) − F_b(x)|, the largest gap between the two empirical distribution functions. */
  d: number;
  /** Asymptotic two-sided p-value Q_KS(√(nm/(n+m))·D). */
  pValue: number;
  /** λ = √(nm/(n+m))·D, the scaled statistic. */
  lambda: number;
  /** Sizes of the two samples. */
  n: number;
  m: number;
}

/**
 * The Kolmogorov survival function Q_KS(λ) = P(K > λ) =
 * 2 Σ_{k≥1} (−1)^{k−1} e^{−2k²λ²}, the limit law of √(nm/(n+m))·D
 * (Kolmogorov, 1933; Smirnov, 1948). For λ < 1.18 the equivalent Jacobi form
 * 1 − (√(2π)/λ) Σ_{k≥1} e^{−(2k−1)²π²/(8λ²)} is summed instead, which
 * converges fast where the alternating series does not.
 *
 * @param lambda the scaled statistic, ≥ 0.
 * @example
 * kolmogorovSurvival(1.3581).toFixed(3); // "0.050"
 */
export function kolmogorovSurvival(lambda: number): number {
  if (typeof lambda !== "number" || Number.isNaN(lambda) || lambda < 0) {
    throw new OptionError("kolmogorovSurvival", "lambda", lambda, "a number >= 0");
  }
  if (lambda === 0) return 1;
  if (lambda === Infinity) return 0;
  if (lambda < 1.18) {
    // Jacobi theta form: P(K ≤ λ) = (√(2π)/λ) Σ e^{−(2k−1)²π²/(8λ²)}.
    const c = (-Math.PI * Math.PI) / (8 * lambda * lambda);
    let sum = 0;
    for (let k = 1; k <= 20; k++) {
      const odd = 2 * k - 1;
      const term = Math.exp(c * odd * odd);
      sum += term;
      if (term < 1e-17 * sum) break;
    }
    return Math.min(1, Math.max(0, 1 - (Math.sqrt(2 * Math.PI) / lambda) * sum));
  }
  const c = -2 * lambda * lambda;
  let sum = 0;
  let sign = 1;
  for (let k = 1; k <= 100; k++) {
    const term = Math.exp(c * k * k);
    sum += sign * term;
    if (term < 1e-17 * Math.abs(sum)) break;
    sign = -sign;
  }
  return Math.min(1, Math.max(0, 2 * sum));
}

/**
 * Two-sample Kolmogorov–Smirnov test: the statistic D (ties handled by
 * stepping both samples past each shared value) and its asymptotic two-sided
 * p-value Q_KS(√(nm/(n+m))·D) (Smirnov, 1948). The asymptotic p-value is
 * conservative-to-accurate for n, m ≳ 25; below that treat it as a guide.
 * Sorts copies; O((n + m) log(n + m)).
 *
 * @example
 * const r = ksTwoSample([0.1, 0.2, 0.3, 0.4], [0.35, 0.5, 0.6, 0.7]);
 * [r.d, r.pValue.toFixed(3)]; // [0.75, "0.211"]
 */
export function ksTwoSample(a: ArrayLike<number>, b: ArrayLike<number>): KsResult {
  const xs = sortedCopy("a", a);
  const ys = sortedCopy("b", b);
  const d = ksStatisticSorted(xs, ys);
  const n = xs.length;
  const m = ys.length;
  const lambda = Math.sqrt((n * m) / (n + m)) * d;
  return { d, pValue: kolmogorovSurvival(lambda), lambda, n, m };
}

/**
 * D = sup |F_a − F_b| for two samples already sorted ascending (no copies,
 * no checks), for callers that keep sorted windows.
 */
export function ksStatisticSorted(xs: ArrayLike<number>, ys: ArrayLike<number>): number {
  const n = xs.length;
  const m = ys.length;
  let i = 0;
  let j = 0;
  let d = 0;
  while (i < n && j < m) {
    const x = xs[i] as number;
    const y = ys[j] as number;
    const v = x <= y ? x : y;
    while (i < n && (xs[i] as number) === v) i++;
    while (j < m && (ys[j] as number) === v) j++;
    const gap = Math.abs(i / n - j / m);
    if (gap > d) d = gap;
  }
  return d;
}

function sortedCopy(name: string, values: ArrayLike<number>): Float64Array {
  const out = finiteSamples("ksTwoSample", name, values);
  if (out.length === 0) throw new OptionError("ksTwoSample", name, values, "a non-empty array of finite numbers");
  return out.sort();
}
