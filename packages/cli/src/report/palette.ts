import type { Cause, Phase } from "@leeway/policy";

/**
 * Ink: headings, the live score. The report's colours: ink-like series on white paper, one distinct hue per
 * cause, and pale phase bands that still separate in grey when printed.
 */
export const INK = "#1f2a36";
/** Secondary text, axes and frames. */
export const MUTED = "#5d6b78";
/** Grid lines and table rules. */
export const GRID = "#e2e6ea";
/** The page. */
export const PAPER = "#ffffff";

/** Score traces: the live model first, then the frozen references. */
export const SERIES_COLOURS = ["#17324d", "#8a8f98", "#2f8c8c", "#7a5c99", "#b06a2c"];

/** One colour per decision cause. */
export const CAUSE_COLOURS: Readonly<Record<Cause, string>> = {
  normal: "#8a8f98",
  commissioning: "#a3822f",
  anomaly: "#c2352b",
  "concept-drift": "#2b6fb0",
  degradation: "#dd7a1f",
  "known-mode": "#2f8f5b",
  operator: "#7d4fa0",
};

/** Labelled-event colours (the truth), by cause. */
export const EVENT_COLOURS: Readonly<Record<"concept-drift" | "degradation" | "anomaly", string>> = {
  "concept-drift": "#2b6fb0",
  degradation: "#dd7a1f",
  anomaly: "#c2352b",
};

/** Phase band fills; "watching" is left white. */
export const PHASE_FILLS: Readonly<Record<Phase, string | null>> = {
  commissioning: "#f2ead6",
  watching: null,
  settling: "#dde9f5",
  retraining: "#dcefe1",
  latched: "#f7dcd8",
};

/** Test statistic and threshold traces. */
export const STATISTIC_COLOUR = "#4a5a9c";
/** Thresholds (dashed). */
export const THRESHOLD_COLOUR = "#b8322a";
