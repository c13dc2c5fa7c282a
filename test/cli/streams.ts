import { RandomSource } from "@leeway/core";

/**
 * Invented score streams for the command tests: reconstruction losses of
 * PS-2 around 0.07 (lognormal, σ of ln 0.1), with the level raised by
 * `shift` (a factor) from sample `shiftAt` on; a reference column that
 * follows the live score.
 */
export function scoreRows(n: number, seed: number, shift = 1, shiftAt = n): { live: number; ref: number }[] {
  const rng = new RandomSource(seed);
  const rows: { live: number; ref: number }[] = [];
  for (let i = 0; i < n; i++) {
    const level = i >= shiftAt ? 0.07 * shift : 0.07;
    const live = level * Math.exp(0.1 * rng.normal());
    rows.push({ live, ref: live * Math.exp(0.05 * rng.normal()) });
  }
  return rows;
}

/** Those rows as CSV with a time column (seconds) and columns score, ref_commissioning. */
export function scoreCsv(n: number, seed: number, shift = 1, shiftAt = n): string {
  return "time,score,ref_commissioning\n" + scoreRows(n, seed, shift, shiftAt).map((r, i) => `${i},${r.live},${r.ref}`).join("\n") + "\n";
}

/** A short engine config for streams of a few thousand samples. */
export const SHORT_ENGINE = { commissioning: 100, calibration: 60, targetArl0: 500, calibrationReplicates: 10, settling: 60, settlingLimit: 400, trendBlock: 5, trendWindow: 40, trendMinBlocks: 10, coolDown: 50 };
