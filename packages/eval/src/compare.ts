import { OptionError, optionsObject } from "@leeway/core";
import { EVALUATE_OPTIONS, checkEvaluateOptions, summarizeDelays, zeroCounts, type EvaluateOptions, type ReplayMetrics, type ResponseClass } from "./metrics.js";
import type { EventCause, ReplayLabels } from "./labels.js";
import { poissonInterval } from "./poisson-interval.js";
import { replay, type Pipeline } from "./replay.js";
import { comparisonMarkdown, type ComparisonRow } from "./comparison-table.js";
export type { ComparisonRow } from "./comparison-table.js";

/** One scenario of a comparison suite: a stream that can be produced afresh, and its truth. */
export interface SuiteScenario<S> {
  name: string;
  /** Called once per policy; must yield the same samples each time. */
  stream(): Iterable<S>;
  labels?: ReplayLabels;
}

/** A policy to compare: a name and a factory of a fresh pipeline for each scenario. */
export interface PolicyUnderTest<S> {
  name: string;
  create(scenario: SuiteScenario<S>): Pipeline<S>;
}


/** What {@link compare} returns. */
export interface Comparison {
  /** One row per policy, pooled over the suite. */
  rows: ComparisonRow[];
  /** One row per policy and scenario. */
  perScenario: ComparisonRow[];
  /** Full metrics per policy and scenario. */
  metrics: { policy: string; scenario: string; metrics: ReplayMetrics }[];
  /** The pooled table in Markdown, then a per-scenario table. */
  markdown: string;
  /** `{ suite, rows, perScenario }` as JSON text. */
  json: string;
}

/**
 * Replays every policy over every scenario of a suite and tabulates the
 * metrics of {@link evaluate}, one row per policy (counts summed; the false
 * alarm rate and ARL pooled over the in-control samples, with the exact
 * Poisson interval of Garwood, 1936; delays over all detected events; areas
 * averaged over scenarios), plus one row per policy and scenario.
 * @example
 * // Two policies that alarm above a fixed score, on one scenario with a rag at 3–4.
 * const above = (limit: number) => (): Pipeline<number> => ({
 *   observe: (s) => ({ index: 0, action: s > limit ? "alarm" : "learn", cause: s > limit ? "anomaly" : "normal", phase: "watching", evidence: { liveScore: s, referenceScores: [s] } }),
 * });
 * const table = compare(
 *   [{ name: "limit 5", create: above(5) }, { name: "limit 1.5", create: above(1.5) }],
 *   [{ name: "rag", stream: () => [1, 2, 1, 9, 8, 1], labels: { events: [{ cause: "anomaly", start: 3, end: 5 }] } }],
 * );
 * table.rows.map((r) => [r.policy, r.detected, r.falseAlarms]); // [["limit 5", 1, 0], ["limit 1.5", 1, 1]]
 * table.markdown.split("\n")[0]; // "| policy | events | detected | right cause | revised | missed d/g/a | ..."
 */
export function compare<S>(policies: readonly PolicyUnderTest<S>[], suite: readonly SuiteScenario<S>[], options?: EvaluateOptions): Comparison {
  const opts = optionsObject<EvaluateOptions>("compare", options, EVALUATE_OPTIONS);
  const { level } = checkEvaluateOptions("compare", opts);
  checkNamed("compare", "policies", policies);
  checkNamed("compare", "suite", suite);
  const metrics: Comparison["metrics"] = [];
  const rows: ComparisonRow[] = [];
  const perScenario: ComparisonRow[] = [];
  for (const policy of policies) {
    const own: { scenario: string; metrics: ReplayMetrics }[] = [];
    for (const scenario of suite) {
      const result = replay(policy.create(scenario), scenario.stream(), scenario.labels, { ...opts, keepDecisions: false });
      own.push({ scenario: scenario.name, metrics: result.metrics });
      metrics.push({ policy: policy.name, scenario: scenario.name, metrics: result.metrics });
      perScenario.push(comparisonRow(policy.name, [{ scenario: scenario.name, metrics: result.metrics }], level));
    }
    rows.push(comparisonRow(policy.name, own, level));
  }
  const json = JSON.stringify({ suite: suite.map((s) => s.name), rows, perScenario }, null, 2);
  return { rows, perScenario, metrics, markdown: comparisonMarkdown(rows, perScenario), json };
}

/** Pools the metrics of several scenarios into one {@link ComparisonRow}. */
export function comparisonRow(policy: string, runs: readonly { scenario: string; metrics: ReplayMetrics }[], level = 0.95): ComparisonRow {
  const sum = (f: (m: ReplayMetrics) => number): number => runs.reduce((s, r) => s + f(r.metrics), 0);
  const delays = summarizeDelays(runs.flatMap((r) => r.metrics.perEvent));
  const falseAlarms = sum((m) => m.falseAlarms);
  const exposure = sum((m) => m.runLengths.exposure);
  const counts = poissonInterval(falseAlarms, level);
  const retrainsByTruth = zeroCounts();
  for (const r of runs) for (const key of Object.keys(retrainsByTruth) as ResponseClass[]) retrainsByTruth[key] += r.metrics.retrains.byTruth[key];
  const areas = runs.map((r) => r.metrics.scores?.reference ?? r.metrics.scores?.live ?? null).filter((a) => a !== null);
  return {
    policy,
    scenarios: runs.map((r) => r.scenario),
    samples: sum((m) => m.samples),
    events: sum((m) => m.events),
    detected: sum((m) => m.detected),
    correctCause: sum((m) => m.correctCause),
    missed: sum((m) => m.missed),
    missedByCause: {
      "concept-drift": sum((m) => m.missedByCause["concept-drift"]),
      degradation: sum((m) => m.missedByCause.degradation),
      anomaly: sum((m) => m.missedByCause.anomaly),
    },
    revisions: sum((m) => m.revisions),
    meanDelay: delays?.mean ?? null,
    medianDelay: delays?.median ?? null,
    falseAlarms,
    exposure,
    falseAlarmsPer10k: exposure > 0 ? (1e4 * falseAlarms) / exposure : null,
    arl: falseAlarms > 0 ? exposure / falseAlarms : null,
    arlLower: exposure / counts.upper,
    arlUpper: counts.lower > 0 ? exposure / counts.lower : null,
    retrains: sum((m) => m.retrains.count),
    retrainsByTruth,
    modeSwitches: sum((m) => m.modeSwitches.count),
    learnedDuringFaults: sum((m) => m.learnedDuring.degradation + m.learnedDuring.anomaly),
    rocAuc: areas.length > 0 ? areas.reduce((s, a) => s + a.rocAuc, 0) / areas.length : null,
    prAuc: areas.length > 0 ? areas.reduce((s, a) => s + a.prAuc, 0) / areas.length : null,
  };
}

function checkNamed(component: string, option: string, items: unknown): void {
  if (!Array.isArray(items) || items.length === 0) throw new OptionError(component, option, items, "a non-empty array");
  const seen = new Set<string>();
  items.forEach((item: unknown, i) => {
    const name = (item as { name?: unknown } | null)?.name;
    if (typeof name !== "string" || name.length === 0) throw new OptionError(component, `${option}[${i}].name`, name, "a non-empty string");
    if (seen.has(name)) throw new OptionError(component, `${option}[${i}].name`, name, "a name not used by another entry");
    seen.add(name);
  });
}
