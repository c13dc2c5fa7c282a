export { replay, replayAsync, scoreOnly } from "./replay.js";
export type { Pipeline, ReplayOptions, ReplayResult, ScoreSample, ScoreOnlyEngine } from "./replay.js";
export { evaluate } from "./evaluate.js";
export { summarizeDelays, checkEvaluateOptions, EVALUATE_OPTIONS, RESPONSE_CLASSES } from "./metrics.js";
export type {
  EvaluateOptions,
  ReplayMetrics,
  EventResult,
  ResponseClass,
  ConfusionTable,
  DelaySummary,
  ResponseTally,
  RunLengths,
  ScoreAreas,
  ScoreMetrics,
} from "./metrics.js";
export { Timeline } from "./timeline.js";
export { responseClass, findEpisodes, findResponses, RESPONSE_ACTIONS } from "./responses.js";
export type { ActionEpisode, Response } from "./responses.js";
export { runLengths } from "./run-lengths.js";
export { anomalyMask, EVENT_CAUSES } from "./labels.js";
export type { LabelledEvent, EventCause, ReplayLabels } from "./labels.js";
export { rocAuc, mannWhitney } from "./roc-auc.js";
export type { MannWhitney } from "./roc-auc.js";
export { prAuc } from "./pr-auc.js";
export { poissonInterval, poissonCdf } from "./poisson-interval.js";
export type { PoissonInterval } from "./poisson-interval.js";
export { compare, comparisonRow } from "./compare.js";
export type { Comparison, ComparisonRow, PolicyUnderTest, SuiteScenario } from "./compare.js";
export { comparisonMarkdown } from "./comparison-table.js";
export { sortFloat64 } from "./sort-float64.js";
export { qualityScenarios, qualitySubset, QUALITY_SUBSET_IDS, eventSeverity, QUALITY_KINDS, QUALITY_RATES, QUALITY_SPECTRUM, FULL_SUITE_SEEDS } from "./quality-scenarios.js";
export type { QualityKind, QualityRate, QualityEvent, QualityScenario, QualitySeeds } from "./quality-scenarios.js";
export { NaivePolicy } from "./naive-policies.js";
export type { NaivePolicyOptions } from "./naive-policies.js";
export { onsetCusumAlarms } from "./onset-cusum.js";
export type { OnsetCusumInput } from "./onset-cusum.js";
export { runQualityScenario, defaultQualityEngineOptions, QUALITY_POLICIES, NAIVE_COMMISSIONING, NAIVE_CALIBRATION, ONSET_CUSUM_ARL0 } from "./quality-run.js";
export type { QualityPolicy, QualityOperator, MachineInspection, QualityRunOptions, EventOutcome, PolicyOutcome, ScenarioOutcome } from "./quality-run.js";
export { qualityTable, quantile } from "./quality-table.js";
export type { QualityRow } from "./quality-table.js";
export { QUALITY_TARGETS, checkTargets } from "./quality-targets.js";
export type { QualityTarget, QualityField, TargetCheck } from "./quality-targets.js";
export { qualityMarkdown } from "./quality-markdown.js";
export type { QualityRunNotes } from "./quality-markdown.js";
