/** How a conformal test martingale bets on each p-value. */
export type ConformalBetting = "jumper" | "power" | "mixture";

/**
 * ln f(p) of the power betting function f(p) = ε·p^{ε−1}, ε in (0, 1) (Vovk, Nouretdinov &
 * Gammerman, 2003): ∫₀¹ f = 1, and f grows without bound as p → 0.
 */
export function powerLogBet(p: number, epsilon: number): number {
  return Math.log(epsilon) + (epsilon - 1) * Math.log(p);
}

/**
 * ln f(p) of the simple mixture f(p) = ∫₀¹ ε·p^{ε−1} dε = (e^{−L} + L − 1)/L², L = ln p
 * (Vovk, Nouretdinov & Gammerman, 2003; Volkhonskiy et al., 2017); near p = 1 the series
 * 1/2 − L/6 + L²/24 − L³/120 avoids the cancellation.
 */
export function mixtureLogBet(p: number): number {
  const L = Math.log(p);
  if (L > -1e-3) return Math.log(0.5 - L / 6 + (L * L) / 24 - (L * L * L) / 120);
  return Math.log((Math.exp(-L) + L - 1) / (L * L));
}

/**
 * One step of the Simple Jumper betting martingale (Vovk, Petej, Nouretdinov, Ahlberg, Carlsson &
 * Gammerman, 2021) with two arms: capital split over the bets f_ε(p) = 1 + ε(p − ½), ε ∈ {−1, 0};
 * before each p-value a fraction J of the whole capital is spread evenly over the arms, so the
 * martingale can switch to the bet that pays after a long in-control stretch. (The published
 * jumper has a third arm, ε = +1, which bets on samples that conform too well; here the
 * nonconformity score already says which way a change must go, and that arm would alarm on the
 * other way.) `shares` holds the two shares of the capital (summing to 1) and is updated in place;
 * returns ln of the capital's growth.
 */
export function jumperLogBet(p: number, jump: number, shares: Float64Array): number {
  const spread = jump / 2;
  const a = (1 - jump) * (shares[0] as number) + spread; // ε = −1: bets on small p
  const b = (1 - jump) * (shares[1] as number) + spread; // ε = 0: holds
  const ga = a * (1.5 - p);
  const growth = ga + b;
  shares[0] = ga / growth;
  shares[1] = b / growth;
  return Math.log(growth);
}
