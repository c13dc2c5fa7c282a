import { describe, expect, it } from "vitest";
import { evaluate, Timeline } from "@leeway/eval";
import type { Decision } from "@leeway/policy";
import { renderReport } from "../../../packages/cli/src/report/html.js";
import { ReportCollector } from "../../../packages/cli/src/report/lanes.js";
import { SAFETY_CAUTION } from "../../../packages/cli/src/report/safety.js";
import { TimelineCollector } from "../../../packages/cli/src/report/timeline.js";
import { handMadeDecision, handMadeDecisions } from "../hand-made.js";
import { INTERNAL_NAMES } from "./internal-names.js";

const events = [
  { cause: "concept-drift" as const, start: 400, end: 450, id: "compressor", label: "compressor <installed>" },
  { cause: "degradation" as const, start: 700, end: 1000, id: "bpfo" },
];


function report(n: number, options: { withEvents?: boolean; time?: (i: number) => string | number | null; samplePeriod?: number } = {}): string {
  const c = new ReportCollector();
  const timeline = new Timeline();
  for (const d of handMadeDecisions(n)) {
    c.add(d, options.time?.(d.index) ?? null);
    timeline.record(d);
  }
  const data = c.result();
  const withEvents = options.withEvents ?? true;
  return renderReport({
    title: "Harbour Lane & PS-2",
    subtitle: "test",
    timeline: data.all,
    lanes: data.lanes,
    ...(withEvents ? { events, metrics: evaluate(timeline, { events }) } : {}),
    ...(options.samplePeriod === undefined ? {} : { samplePeriod: options.samplePeriod }),
    version: "9.9.9",
  });
}

/** The text a reader sees: tags, styles and attribute values removed. */
function visibleText(html: string): string {
  return html.replace(/<style>[\s\S]*?<\/style>/g, "").replace(/<title>[\s\S]*?<\/title>/g, "").replace(/<[^>]+>/g, " ").replace(/&[a-z]+;|&#\d+;/g, " ");
}

describe("renderReport", () => {
  it("is self-contained: no script, no link, no external URL, no font or image to fetch", () => {
    const html = report(1000);
    expect(html).not.toMatch(/<script|<link|<img|<iframe|@import|url\(|https?:\/\/|src=/i);
    expect(html.startsWith("<!DOCTYPE html>")).toBe(true);
  });
  it("has the plots: scores, the change test, trend evidence, causes and events, each with drawn traces", () => {
    const html = report(1000);
    for (const id of ["lane-1-scores", "lane-1-change", "lane-1-trend", "lane-1-trend-p", "plot-causes", "plot-events"]) expect(html).toContain(`id="${id}"`);
    const paths = [...html.matchAll(/<path class="trace" data-key="([^"]+)" d="([^"]*)"/g)];
    expect(paths.map((m) => m[1])).toEqual(expect.arrayContaining(["liveScore", "referenceScores.0", "change.statistic", "change.threshold", "trend.z", "trend.pValue"]));
    for (const m of paths) expect(m[2]!.length, m[1]).toBeGreaterThan(20);
  });
  it("shows no internal field name and no code spelling of the vocabulary in its visible text", () => {
    const text = visibleText(report(1000));
    for (const name of INTERNAL_NAMES) expect(text, String(name)).not.toMatch(name);
    for (const words of ["live model score", "commissioning reference score", "change test threshold", "trend strength (Mann-Kendall z)", "false alarms per 10 000 samples", "changed conditions (concept drift)"]) expect(text).toContain(words);
  });
  it("the headline names the open alarm, its cause, since when and its evidence in words", () => {
    const html = report(1000, { samplePeriod: 60 });
    const head = /<section aria-labelledby="h-attention">([\s\S]*?)<\/section>/.exec(html)?.[1] ?? "";
    // The hand-made stream ends in a degradation alarm latched from 85 % of the record (sample 850, minute 850).
    expect(head).toContain("The engine — Alarm latched: slow degradation");
    expect(head).toContain("since day 1 14:10, 2.5 h (149 samples) before the end of the record");
    expect(head).toContain("Trend of the reference score: trend strength (Mann-Kendall z) 1.5");
    expect(head).toContain("During the record: 2 alarms (1 anomaly, 1 degradation), 1 retrain (1 concept drift), no switches to a known mode.");
    // The hand-made stream learns on through the labelled degradation until its alarm: the figure is marked.
    expect(head).toMatch(/<span class="big bad">150<\/span>samples learnt during a degradation/);
  });
  it("shows what moved and the time to a limit when a decision's evidence carries them", () => {
    const n = 400;
    const c = new ReportCollector();
    for (let i = 0; i < n; i++) {
      const d = handMadeDecision(i, n);
      if (d.phase === "latched") d.evidence.degradation = { movedBands: [37, 38, 112], samplesToLimit: 1800 };
      c.add(d, null);
    }
    const data = c.result();
    const html = renderReport({ title: "t", timeline: data.all, lanes: data.lanes, samplePeriod: 10, version: "0" });
    expect(html).toContain("<strong>What moved</strong> (degradation: moved bands): 37, 38, 112");
    expect(html).toContain("<strong>Time to the limit</strong> (degradation: samples to limit): 1800 samples (≈ 5 h)");
  });
  it("the headline tells the engine's time to its limit at the current rate: for an open alarm from the latest decision, else per engine", () => {
    const n = 400;
    const limit = (i: number) => ({ status: "estimated", limit: 0.25, limitSigma: 5, confidence: 0.9, pValue: 0.001, slope: 1e-4, slopeLower: 5e-5, slopeUpper: 2e-4, levelSigma: 2, expected: 2000 - i, earliest: 1000 - i, latest: 4000 - i, crossingIndex: 2000, seconds: null });
    const open = new ReportCollector();
    for (let i = 0; i < n; i++) {
      const d = handMadeDecision(i, n);
      if (d.phase === "latched") d.evidence.limit = limit(i);
      open.add(d, null);
    }
    const a = open.result();
    const html = renderReport({ title: "t", timeline: a.all, lanes: a.lanes, samplePeriod: 10, version: "0" });
    // the last decision (sample 399) tells 601 to 3601 samples of 10 s
    expect(html).toContain("<strong>Time to the limit</strong>: limit 0.25 (score) reached in 1.7 h to 10 h at the current rate (expected 4.4 h; 90 % interval, 601 to 3601 samples)");
    expect(html).not.toContain("(time to the limit: limit)");
    const closed = new ReportCollector();
    for (let i = 0; i < n; i++) {
      const d = handMadeDecision(i, n);
      if (d.phase === "latched") d.phase = "watching";
      if (d.cause === "degradation") d.evidence.limit = i < 390 ? limit(i) : { status: "refused", limit: 0.25, limitSigma: 5, confidence: 0.9, pValue: 0.4, reason: "no-significant-trend", detail: "no trend at α = 0.1", slopeLower: null, slopeUpper: null, seconds: null };
      closed.add(d, null);
    }
    const c = closed.result();
    const calm = renderReport({ title: "t", timeline: c.all, lanes: c.lanes, samplePeriod: 10, version: "0" });
    expect(calm).toContain("Time to the limit at the latest degradation evidence");
    expect(calm).toMatch(/limit 0\.25 \(score\): no time estimated — no trend at α = 0\.1 \(as of /);
  });
  it("the time axis is wall-clock time from the time column, or from a sample period, or sample numbers", () => {
    const clock = report(1000, { time: (i) => new Date(Date.UTC(2026, 2, 2, 6) + i * 60_000).toISOString() });
    expect(clock).toMatch(/class="tick">2026-03-02 1\d:00<\/text>/);
    const elapsed = report(1000, { samplePeriod: 360 });
    expect(elapsed).toMatch(/class="tick">day 3 \d\d:00<\/text>/);
    expect(report(1000)).toMatch(/class="tick">sample 600<\/text>/);
  });
  it("one lane per engine, each with its own thresholds, on one shared axis", () => {
    const n = 1200;
    const c = new ReportCollector();
    for (const d of handMadeDecisions(n)) {
      const mode = Math.floor(d.index / 100) % 2 === 0 ? "low" : "high";
      const change = d.evidence.change as { threshold: number };
      c.add({ ...d, evidence: { ...d.evidence, mode, change: { ...change, threshold: mode === "low" ? 4 : 7 } } } as Decision, null);
    }
    const data = c.result();
    expect(data.lanes.map((l) => l.name)).toEqual(["low", "high"]);
    const html = renderReport({ title: "t", timeline: data.all, lanes: data.lanes, laneTitle: (m) => `Engine at ${m} speed`, version: "0" });
    expect(html).toContain("Engine at low speed</h2>");
    expect(html).toContain("Engine at high speed</h2>");
    const thresholds = data.lanes.map((l) => l.timeline.series.find((s) => s.key === "change.threshold")!);
    const levels = thresholds.map((s) => [...s.max].filter((v) => Number.isFinite(v)));
    expect(new Set(levels[0])).toEqual(new Set([4]));
    expect(new Set(levels[1])).toEqual(new Set([7]));
  });
  it("draws phases as bands, markers coloured by cause, and the labelled events with their labels escaped", () => {
    const html = report(1000);
    for (const phase of ["commissioning", "settling", "retraining", "latched"]) expect(html).toContain(`data-phase="${phase}"`);
    expect(html).toMatch(/class="marker" data-action="alarm" data-cause="degradation"/);
    expect(html).toMatch(/class="marker" data-action="retrain" data-cause="concept-drift"/);
    expect(html).toContain("compressor &lt;installed&gt; (concept drift)");
    expect(html).toContain("bpfo (degradation)");
    expect(html).not.toContain("<installed>");
    expect(report(1000, { withEvents: false })).not.toContain('id="plot-events"');
  });
  it("prints the metrics in words with units, the event table, and the safety caution in the footer", () => {
    const html = report(1000, { samplePeriod: 60 });
    expect(html).toContain("<caption>Key figures</caption>");
    expect(html).toContain("<caption>What the answers claimed (columns) against what happened (rows)</caption>");
    expect(html).toMatch(/<td>\d+ samples \(≈ [\d.]+ (min|h|s)\)<\/td>/);
    expect(html).toContain("Alarms, retrains, switches, holds and phases entered, with the labelled events");
    expect(html).toContain("<strong>What happened:</strong> compressor &lt;installed&gt;");
    const footer = /<footer>([\s\S]*)<\/footer>/.exec(html)?.[1] ?? "";
    expect(footer).toContain(SAFETY_CAUTION.replace(/'/g, "&#39;"));
    expect(footer).toContain("leeway 9.9.9");
    expect(html).toContain("Harbour Lane &amp; PS-2");
  });
  it("has a print stylesheet for A4", () => {
    expect(report(300)).toMatch(/@media print\{\s*@page\{size:A4 portrait/);
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
