import { finiteArray, finiteNumber, nonNegativeInteger, nonNegativeNumber, numberInRange, OptionError, optionsObject, positiveInteger, positiveNumber } from "@leeway/core";
import { SEN_INTERVAL_MAX_N, senSlopeInterval, timeToLimit, type TimeToLimitRefusal } from "@leeway/stats";
import type { ScoreLevel } from "./calibration.js";

/** What {@link limitEvidence} needs: the trend window, where it stands in the stream, and the limit. */
export interface LimitEvidenceInput {
  /** The degradation trend's block means of the normalised score, oldest first, in σ. */
  means: ArrayLike<number>;
  /** Samples averaged into one block mean (the engine's `trendBlock`). */
  blockLength: number;
  /** The current sample index. */
  index: number;
  /** Samples taken since the latest complete block (0 when a block has just completed, the default). */
  sinceLastBlock?: number;
  /** The limit the user sets, a score level (score units, ≥ 0) of the reference whose trend this is. */
  limit: number;
  /** That reference's calibrated level: mean and spread of ln(score + scoreFloor). */
  level: ScoreLevel;
  /** The engine's `scoreFloor`. */
  scoreFloor: number;
  /** The engine's `scoreClip`, in σ: normalised scores are clipped to it, so block means never pass it. */
  scoreClip: number;
  /** Two-sided confidence level of the interval, in (0, 1) (default 0.9). */
  confidence?: number;
}

/** Why {@link limitEvidence} gives no time. */
export type LimitRefusal = "too-few-blocks" | "no-significant-trend" | "not-monotone" | "slope-interval-includes-zero" | "moving-away" | "limit-beyond-clip";

/** The part every answer of {@link limitEvidence} shares. */
interface LimitCommon {
  /** The limit in score units, as given. */
  limit: number;
  /** The limit on the trend's scale: (ln(limit + floor) − μ)/σ. */
  limitSigma: number;
  confidence: number;
  /** Mann-Kendall two-sided p-value of the window (null below two blocks). */
  pValue: number | null;
}

/** The fitted line: slope and Sen's interval for it, in σ per sample, and its level at the latest block. */
interface LimitLine {
  slope: number;
  slopeLower: number;
  slopeUpper: number;
  /** The line's level at the centre of the latest block, in σ. */
  levelSigma: number;
}

/** The trend runs towards the limit: when it gets there, counted in samples from the current one. */
export interface LimitEstimate extends LimitCommon, LimitLine {
  status: "estimated";
  /** Samples from now until the line reaches the limit (0 when it is due already). */
  expected: number;
  /** The interval for that time at the confidence level, in samples from now (each at least 0). */
  earliest: number;
  latest: number;
  /** The sample index at which the line reaches the limit (rounded). */
  crossingIndex: number;
}

/** The line is at or past the limit already. */
export interface LimitReached extends LimitCommon, LimitLine {
  status: "reached";
}

/** No time, and why. */
export interface LimitRefused extends LimitCommon {
  status: "refused";
  reason: LimitRefusal;
  /** One sentence for a person. */
  detail: string;
  /** Sen's slope interval in σ per sample where it was computed, else null. */
  slopeLower: number | null;
  slopeUpper: number | null;
}

/** What {@link limitEvidence} returns. */
export type LimitEvidence = LimitEstimate | LimitReached | LimitRefused;

const NAME = "limitEvidence";
const KNOWN = ["means", "blockLength", "index", "sinceLastBlock", "limit", "level", "scoreFloor", "scoreClip", "confidence"] as const;
const REASONS: Record<TimeToLimitRefusal, LimitRefusal> = {
  "too-few-values": "too-few-blocks",
  "no-significant-trend": "no-significant-trend",
  "not-monotone": "not-monotone",
  "moving-away": "moving-away",
};

/**
 * The time until a degrading reference's score reaches a limit the user sets,
 * with an interval, from the degradation rule's window of block means: the
 * limit is put on the window's scale (z = (ln(limit + floor) − μ)/σ), then
 * `timeToLimit` of @leeway/stats fits the Theil-Sen line with Sen's slope
 * interval (Sen, 1968) and Fieller's interval for the crossing (Fieller, 1954),
 * at one step per block. Times are counted from the current sample: the
 * latest block mean stands at its block's centre, `sinceLastBlock` +
 * (blockLength − 1)/2 samples back.
 *
 * It refuses, with the reason, when the window has fewer than 10 blocks, the
 * Mann-Kendall test finds no trend at α = 1 − confidence, one half of the
 * window trends against the whole (not monotone), Sen's slope interval
 * includes zero, the trend runs away from the limit, or the limit lies at or
 * beyond the clip of the normalised scores (block means cannot reach it).
 * A straight line is assumed; for a trend that accelerates, the times are late.
 * @example
 * const means = Array.from({ length: 40 }, (_, i) => 0.05 * i + 0.02 * Math.sin(7 * i));
 * // 40 block means of 60 samples rising 0.05 σ per block; the limit e³ lies 3 σ above normal
 * const e = limitEvidence({ means, blockLength: 60, index: 2399, limit: Math.exp(3), level: { mean: 0, spread: 1 }, scoreFloor: 1e-12, scoreClip: 6 });
 * e.status === "estimated" ? [e.expected, e.earliest, e.latest].map(Math.round) : e.status; // [1228, 1210, 1246]
 */
export function limitEvidence(input: LimitEvidenceInput): LimitEvidence {
  const o = optionsObject<LimitEvidenceInput>(NAME, input, KNOWN);
  const means = finiteArray(NAME, "means", o.means, { atMost: SEN_INTERVAL_MAX_N });
  const blockLength = positiveInteger(NAME, "blockLength", o.blockLength);
  const index = nonNegativeInteger(NAME, "index", o.index, Number.MAX_SAFE_INTEGER);
  const sinceLastBlock = o.sinceLastBlock === undefined ? 0 : nonNegativeInteger(NAME, "sinceLastBlock", o.sinceLastBlock, blockLength - 1);
  const limit = nonNegativeNumber(NAME, "limit", o.limit);
  const level = optionsObject<ScoreLevel>(NAME, o.level, ["mean", "spread"]);
  const mean = finiteNumber(NAME, "level.mean", level.mean);
  const spread = positiveNumber(NAME, "level.spread", level.spread);
  const floor = positiveNumber(NAME, "scoreFloor", o.scoreFloor);
  const clip = positiveNumber(NAME, "scoreClip", o.scoreClip);
  const confidence = o.confidence === undefined ? 0.9 : numberInRange(NAME, "confidence", o.confidence, { min: 0, max: 1, minExclusive: true, maxExclusive: true });
  const limitSigma = (Math.log(limit + floor) - mean) / spread;
  if (!Number.isFinite(limitSigma)) throw new OptionError(NAME, "limit", limit, "a score level whose normalised value (ln(limit + scoreFloor) − μ)/σ is finite");

  const t = timeToLimit(means, { limit: limitSigma, confidence, step: blockLength });
  const common = { limit, limitSigma, confidence, pValue: Number.isFinite(t.pValue) ? t.pValue : null };
  const refuse = (reason: LimitRefusal, detail: string, lower: number | null = null, upper: number | null = null): LimitRefused => ({ status: "refused", ...common, reason, detail, slopeLower: lower, slopeUpper: upper });
  if (limitSigma >= clip) {
    return refuse("limit-beyond-clip", `the limit ${limit} lies ${limitSigma.toFixed(2)} σ above the reference's normal level, at or beyond the ±${clip} σ clip of the normalised scores: the trend cannot reach it (raise scoreClip)`);
  }
  const holdsZero = (lower: number, upper: number): LimitRefused =>
    refuse("slope-interval-includes-zero", `Sen's ${percent(confidence)} slope interval [${lower.toPrecision(3)}, ${upper.toPrecision(3)}] σ per sample includes zero`, lower, upper);
  if (t.status === "refused") {
    const trendFound = t.pValue <= 1 - confidence;
    if (!trendFound || (t.reason !== "no-significant-trend" && t.reason !== "moving-away")) return refuse(REASONS[t.reason], t.detail);
    // a Mann-Kendall trend, yet no bounded crossing or a slope against it: say whether Sen's interval holds 0
    const sen = senSlopeInterval(means, { confidence });
    const lower = sen.lower / blockLength;
    const upper = sen.upper / blockLength;
    return lower <= 0 && upper >= 0 ? holdsZero(lower, upper) : refuse(REASONS[t.reason], t.detail, lower, upper);
  }
  const line = { slope: t.slope, slopeLower: t.slopeLower, slopeUpper: t.slopeUpper, levelSigma: t.level };
  if (t.status === "reached") return { status: "reached", ...common, ...line };
  if (t.slopeLower <= 0 && t.slopeUpper >= 0) return holdsZero(t.slopeLower, t.slopeUpper);
  // timeToLimit counts from the latest block mean, which stands at its block's centre
  const behind = sinceLastBlock + (blockLength - 1) / 2;
  const fromNow = (time: number): number => Math.max(0, time - behind);
  return { status: "estimated", ...common, ...line, expected: fromNow(t.expected), earliest: fromNow(t.earliest), latest: fromNow(t.latest), crossingIndex: Math.round(index - behind + t.expected) };
}

function percent(p: number): string {
  return `${+(100 * p).toFixed(1)} %`;
}
