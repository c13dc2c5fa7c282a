import { describe, expect, it } from "vitest";
import { checkTargets, qualityMarkdown, qualitySubset, qualityTable, QUALITY_POLICIES, QUALITY_TARGETS, runQualityScenario, type ScenarioOutcome } from "@leeway/eval";
import { scriptedQualityOperator } from "../../packages/cli/src/quality-operator.js";

/**
 * The targets (id, rate, engine run) that the engine meets on the subset and
 * that are therefore asserted; every other target is printed. When the
 * engine comes to meet a printed one, add it here.
 */
const ASSERTED: readonly string[] = [
  "degradation-alarmed-before-half | 1 s | engine, operator",
  "degradation-alarmed-before-half | 1 s | engine, unattended",
  "degradation-learnt-after-warning | 1 s | engine, operator",
  "degradation-learnt-after-warning | 1 s | engine, unattended",
  ...["1 s", "10 min"].flatMap((rate) => ["operator", "unattended"].map((who) => `degradation-one-alarm | ${rate} | engine, ${who}`)),
  "degradation-beats-always-adapt | 1 s | engine, operator",
  "degradation-beats-always-adapt | 1 s | engine, unattended",
  "degradation-beats-always-adapt | 10 min | engine, operator",
  "degradation-beats-always-adapt | 10 min | engine, unattended",
  ...["1 s", "10 min"].flatMap((rate) =>
    ["engine, operator", "engine, unattended"].flatMap((policy) =>
      ["fault-alarmed-within-5", "fault-never-learnt", "fault-never-retrained", "fault-one-alarm"].map((id) => `${id} | ${rate} | ${policy}`),
    ),
  ),
  ...["abrupt-shift", "gradual-shift", "gain-change"].flatMap((kind) =>
    ["absorbed-once", "pages", "no-degradation-alarm", "beats-frozen-only"].flatMap((t) => ["operator", "unattended"].map((who) => `${kind}-${t} | 1 s | engine, ${who}`)),
  ),
  ...["fault-delay-vs-cusum", "abrupt-shift-delay-vs-cusum"].flatMap((id) => ["operator", "unattended"].map((who) => `${id} | 1 s | engine, ${who}`)),
  "recurring-modes-known-silent | 1 s | engine, operator",
];

describe("decision-quality subset (8 scenarios of the suite, every event kind but the quiet streams)", () => {
  const outcomes: ScenarioOutcome[] = qualitySubset().map((s) => runQualityScenario(s, { operator: scriptedQualityOperator }));
  const rows = qualityTable(outcomes);
  const checks = checkTargets(rows);
  const key = (c: (typeof checks)[number]): string => `${c.target.id} | ${c.rate} | ${c.policy}`;

  it("measures every policy on every scenario, with one outcome per true event", () => {
    for (const o of outcomes) {
      expect(o.policies.map((p) => p.policy)).toEqual([...QUALITY_POLICIES]);
      for (const p of o.policies) expect(p.samples).toBe(o.samples);
    }
    expect(rows.length).toBe(new Set(outcomes.map((o) => `${o.kind}/${o.rate}`)).size * QUALITY_POLICIES.length);
    console.log(qualityMarkdown(rows, [], { title: "subset", scenarios: outcomes.length, samples: outcomes.reduce((s, o) => s + o.samples, 0), preamble: "", plot: null }));
  });

  it("the naive policies fail where they must: always adapt learns every sample of a degradation, frozen only never learns one", () => {
    const degradation = rows.filter((r) => r.kind === "degradation");
    for (const r of degradation.filter((r) => r.policy === "frozen only")) expect(r.learntDuringDegradation).toBe(0);
    for (const r of degradation.filter((r) => r.policy === "always adapt")) expect(r.rightCauseRate).toBe(0);
    for (const o of outcomes.filter((o) => o.kind === "degradation")) {
      const adapt = o.policies.find((p) => p.policy === "always adapt")!;
      for (const e of adapt.events) expect(e.learnt).toBe(e.end - e.start);
    }
  });

  it("meets the asserted targets (printed: every target with its value, met or not)", () => {
    for (const c of checks) console.log(`${c.met ? "met   " : "missed"} ${key(c)}: ${c.actual} vs ${c.target.op} ${c.bound} (${c.target.metric}; target ${c.target.target})`);
    const known = new Set(checks.map(key));
    for (const k of ASSERTED) expect(known.has(k), `target row ${k} exists`).toBe(true);
    for (const c of checks.filter((c) => ASSERTED.includes(key(c)))) expect(c.met, key(c)).toBe(true);
    expect(QUALITY_TARGETS.length).toBeGreaterThan(0);
  });
});
