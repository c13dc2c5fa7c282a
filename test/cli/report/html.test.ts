import { describe, expect, it } from "vitest";
import { renderReport } from "../../../packages/cli/src/report/html.js";
import { SAFETY_CAUTION } from "../../../packages/cli/src/report/safety.js";
import { TimelineCollector } from "../../../packages/cli/src/report/timeline.js";
import { handMadeDecision, handMadeDecisions } from "../hand-made.js";

const events = [
  { cause: "concept-drift" as const, start: 400, end: 450, label: "compressor <installed>" },
  { cause: "degradation" as const, start: 700, end: 1000, id: "bpfo" },
];

function report(n: number, withEvents = true): string {
  const c = new TimelineCollector();
  for (const d of handMadeDecisions(n)) c.add(d);
  return renderReport({ title: "Harbour Lane & PS-2", subtitle: "test", timeline: c.result(), ...(withEvents ? { events } : {}), metrics: { samples: n, falseAlarms: 1, confusion: { anomaly: { anomaly: 1, none: 0 }, none: { anomaly: 2, none: 0 } } }, version: "9.9.9" });
}

describe("renderReport", () => {
  it("is self-contained: no script, no link, no external URL, no font or image to fetch", () => {
    const html = report(1000);
    expect(html).not.toMatch(/<script|<link|<img|<iframe|@import|url\(|https?:\/\/|src=/i);
    expect(html.startsWith("<!DOCTYPE html>")).toBe(true);
  });
  it("has the plots: scores, the change test, trend evidence, causes and events, each with drawn traces", () => {
    const html = report(1000);
    for (const id of ["plot-scores", "plot-test-change", "plot-trend-z", "plot-trend-pvalue", "plot-causes", "plot-events"]) expect(html).toContain(`id="${id}"`);
    const paths = [...html.matchAll(/<path class="trace" data-key="([^"]+)" d="([^"]*)"/g)];
    expect(paths.map((m) => m[1])).toEqual(expect.arrayContaining(["liveScore", "referenceScores.0", "change.statistic", "change.threshold", "trend.z", "trend.pValue"]));
    for (const m of paths) expect(m[2]!.length, m[1]).toBeGreaterThan(20);
  });
  it("draws phases as bands, markers coloured by cause, and the labelled events with their labels escaped", () => {
    const html = report(1000);
    for (const phase of ["commissioning", "settling", "retraining", "latched"]) expect(html).toContain(`data-phase="${phase}"`);
    expect(html).toMatch(/class="marker" data-action="alarm" data-cause="degradation"/);
    expect(html).toMatch(/class="marker" data-action="retrain" data-cause="concept-drift"/);
    expect(html).toContain("compressor &lt;installed&gt; (concept-drift)");
    expect(html).toContain("bpfo (degradation)");
    expect(html).not.toContain("<installed>");
    expect(report(1000, false)).not.toContain('id="plot-events"');
  });
  it("prints the metrics, the decision counts, the decision changes, and the safety caution in the footer", () => {
    const html = report(1000);
    expect(html).toContain("<caption>confusion</caption>");
    expect(html).toContain("<caption>Decisions by action and cause</caption>");
    expect(html).toContain("Samples where the action, cause or phase changed");
    const footer = /<footer>([\s\S]*)<\/footer>/.exec(html)?.[1] ?? "";
    expect(footer).toContain(SAFETY_CAUTION.replace(/'/g, "&#39;"));
    expect(footer).toContain("leeway 9.9.9");
    expect(html).toContain("Harbour Lane &amp; PS-2");
  });
  it("equal inputs give byte-identical reports (no date in the page)", () => {
    expect(report(800)).toBe(report(800));
  });
  it("a report of 10^6 decisions stays under 1 MB", () => {
    const n = 1_000_000;
    const c = new TimelineCollector();
    for (let i = 0; i < n; i++) c.add(handMadeDecision(i, n));
    const html = renderReport({ title: "big", timeline: c.result(), events, version: "0" });
    expect(Buffer.byteLength(html)).toBeLessThan(1_000_000);
    expect(html).toContain("columns of 1024 samples");
  });
});
