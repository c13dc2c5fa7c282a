import type { Action, Cause, Phase } from "@leeway/policy";

/**
 * The report's one glossary: every word the page shows for an action, a
 * cause, a phase, an evidence field or a metric comes from here, so that no
 * internal field name reaches the reader.
 */

/** What each action means, as a report says it. */
export const ACTION_WORDS: Readonly<Record<Action, string>> = {
  learn: "learnt",
  hold: "held (not learnt)",
  retrain: "retrain",
  "switch-mode": "switched to a known mode",
  alarm: "alarm",
  "await-confirmation": "waiting for an operator to confirm a retrain",
};

/** Each cause in plain words. */
export const CAUSE_WORDS: Readonly<Record<Cause, string>> = {
  normal: "normal",
  commissioning: "commissioning",
  anomaly: "anomaly",
  "concept-drift": "changed conditions (concept drift)",
  degradation: "slow degradation",
  "known-mode": "known operating mode",
  operator: "operator",
};

/** Each cause in one or two words, for legends and lanes. */
export const CAUSE_SHORT: Readonly<Record<Cause, string>> = {
  normal: "normal",
  commissioning: "commissioning",
  anomaly: "anomaly",
  "concept-drift": "concept drift",
  degradation: "degradation",
  "known-mode": "known mode",
  operator: "operator",
};

/** Each phase in plain words. */
export const PHASE_WORDS: Readonly<Record<Phase, string>> = {
  commissioning: "commissioning",
  watching: "watching",
  settling: "settling after a change",
  retraining: "retraining",
  latched: "alarm latched (until acknowledged)",
};

/** Evidence fields the engine writes, by path, with their units. */
const FIELD_WORDS: Readonly<Record<string, string>> = {
  liveScore: "live model score",
  "referenceScores.0": "commissioning reference score",
  "referenceScores.1": "newest reference score",
  activeReference: "reference in use",
  mode: "operating mode",
  modeIndex: "sample of this mode",
  "commissioning.progress": "commissioning done (fraction)",
  "calibration.progress": "calibration done (fraction)",
  "trend.blocks": "trend blocks seen",
  "trend.z": "trend strength (Mann-Kendall z)",
  "trend.pValue": "trend p-value",
  "trend.slope": "trend slope (σ per sample)",
  "trend.rise": "trend rise over the window (σ)",
  "gap.value": "reference–live gap (σ)",
  "gap.blocks": "gap blocks seen",
  "gap.z": "gap trend strength (Mann-Kendall z)",
  "gap.pValue": "gap trend p-value",
  "gap.slope": "gap trend slope (σ per sample)",
  "gap.rise": "gap rise over the window (σ)",
  "change.test": "change test",
  "change.statistic": "change test statistic",
  "change.threshold": "change test threshold",
  "change.status": "change test status",
  "change.direction": "direction of the change",
  "anomaly.threshold": "anomaly threshold (score)",
  "anomaly.run": "anomalous samples in a row",
  "anomaly.needed": "anomalous samples that raise an alarm",
  "anomaly.above": "above the anomaly threshold",
  "settling.samples": "settling samples",
  "settling.needed": "settling samples needed",
  "settling.elapsed": "samples since the change",
  "settling.progress": "settling done (fraction)",
  "settling.trendZ": "trend strength while settling (z)",
  "settling.shift": "level shift (σ)",
  outcome: "outcome",
  confirmed: "confirmed by an operator",
  skipped: "non-finite samples skipped",
  "candidate.trainingSamples": "candidate's training samples",
  "candidate.heldOutSamples": "candidate's held-out samples",
  "candidate.trainingLoss": "candidate's training loss",
  "candidate.heldOutLoss": "candidate's held-out loss",
  "candidate.referenceLoss": "reference loss on the same samples",
  "candidate.passed": "candidate passed validation",
  "limit.limit": "limit (score)",
  "limit.limitSigma": "limit above normal (σ)",
  "limit.expected": "expected samples to the limit",
  "limit.earliest": "earliest samples to the limit",
  "limit.latest": "latest samples to the limit",
  "limit.crossingIndex": "sample at which the limit is reached",
  "budget.used": "retrains used in the horizon",
  "budget.allowed": "retrains allowed in the horizon",
  "budget.horizon": "retrain horizon (samples)",
};

/** Section names of the engine's evidence, for titles. */
const SECTION_WORDS: Readonly<Record<string, string>> = {
  change: "Change test",
  trend: "Trend of the reference score",
  gap: "Reference–live gap",
  anomaly: "Anomaly",
  settling: "Settling",
  candidate: "Retrain candidate",
  budget: "Retrain budget",
  limit: "Time to the limit",
  persistentAnomaly: "Persisting anomaly",
  commissioning: "Commissioning",
  calibration: "Calibration",
};

/** camelCase or snake_case → lower-case words ("heldOutLoss" → "held out loss"). */
export function words(key: string): string {
  return key
    .replace(/([a-z0-9])([A-Z])/g, "$1 $2")
    .replace(/[_-]+/g, " ")
    .replace(/\s+/g, " ")
    .trim()
    .toLowerCase();
}

/**
 * The plain-words label of an evidence path (`"trend.pValue"` → "trend
 * p-value"); paths the glossary does not know are spelt out word by word.
 * @example
 * fieldLabel("gap.pValue"); // "gap trend p-value"
 * fieldLabel("bands.moved"); // "bands: moved"
 */
export function fieldLabel(path: string): string {
  const known = FIELD_WORDS[path];
  if (known !== undefined) return known;
  const parts = path.split(".");
  if (parts[0] === "referenceScores") return `reference ${Number(parts[1]) + 1} score`;
  if (parts.length === 1) return words(path);
  return `${sectionLabel(parts.slice(0, -1).join(".")).toLowerCase()}: ${words(parts[parts.length - 1] as string)}`;
}

/** The title of an evidence section (`"change"` → "Change test"). */
export function sectionLabel(key: string): string {
  const known = SECTION_WORDS[key];
  if (known !== undefined) return known;
  const w = words(key.replace(/\./g, " "));
  return w.charAt(0).toUpperCase() + w.slice(1);
}

/** The kind of change test, in words (`"Cusum"` → "two-sided CUSUM"). */
export function testLabel(name: string): string {
  const n = name.toLowerCase();
  if (n.includes("cusum")) return "CUSUM";
  if (n.includes("ewma")) return "EWMA chart";
  if (n.includes("page")) return "Page-Hinkley";
  if (n.includes("adwin")) return "ADWIN";
  if (n.includes("ks") || n.includes("kolmogorov")) return "Kolmogorov-Smirnov window";
  return words(name);
}

/** Metric names of the evaluation, in words with their units. */
export const METRIC_WORDS: Readonly<Record<string, string>> = {
  samples: "samples",
  events: "labelled events in the record",
  eventsBeyondStream: "labelled events after the record's end",
  detected: "events answered",
  missed: "events missed",
  correctCause: "events answered with the true cause",
  falseAlarms: "false alarms",
  falseAlarmsPer10k: "false alarms per 10 000 samples",
  repeats: "further alarms within an event already answered",
  revisions: "answers corrected to the true cause",
};
