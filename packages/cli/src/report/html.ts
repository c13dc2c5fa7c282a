import type { ReplayMetrics } from "@leeway/eval";
import { eventTable } from "./event-table.js";
import { ACTION_WORDS, CAUSE_WORDS } from "./glossary.js";
import { headline } from "./headline.js";
import type { Lane } from "./lanes.js";
import { lanePlots } from "./lane-plots.js";
import { metricTables } from "./metric-tables.js";
import { INK, MUTED, PAPER, GRID } from "./palette.js";
import { axisOf, causeStrip, eventStrip, type ReportEvent } from "./plots.js";
import { SAFETY_CAUTION } from "./safety.js";
import { escapeXml, formatNumber } from "./scale.js";
import { tableHtml, type Table } from "./tables.js";
import { formatTime } from "./time-axis.js";
import type { ReportTimeline } from "./timeline.js";

/** Everything a report shows. */
export interface ReportContent {
  /** Heading, e.g. "Harbour Lane pump station, skid PS-2". */
  title: string;
  /** One line under the heading (what was replayed, how). */
  subtitle?: string;
  /** The whole record (every decision in stream order). */
  timeline: ReportTimeline;
  /** One lane per engine (see {@link ReportCollector}); default one lane of the whole record. */
  lanes?: readonly Lane[];
  /** A lane's heading from its name (the operating mode), e.g. "mid" → "1485 rpm"; default "Engine for mode …". */
  laneTitle?: (name: string) => string;
  /** Labelled events (the truth), when labels were given. */
  events?: readonly ReportEvent[];
  /** Metrics of the replay against the labels (the evaluator's result). */
  metrics?: ReplayMetrics;
  /** Facts about the run, printed as a small table (input, mode, samples, ...). */
  facts?: readonly [string, string][];
  /** Seconds between samples, for the time axis when the record has no time column; null: unknown. */
  samplePeriod?: number | null;
  /** The leeway version that wrote the report. */
  version: string;
  /** Set when the decisions are known to be incomplete: why (shown at the top of the page). */
  incomplete?: string;
}

/** The styles the plots need on their own (tick labels, legends), for showing a figure outside a report. */
export const FIGURE_STYLE = `figure.plot{margin:0 0 14px;font:13px/1.4 system-ui,sans-serif;color:${INK}}figcaption{color:${MUTED}}figcaption strong{color:${INK};margin-right:6px}svg text.tick{font-size:11px;fill:${MUTED}}svg text.event-label{font-size:11px;fill:${INK}}ul.legend{list-style:none;display:flex;flex-wrap:wrap;gap:4px 16px;margin:2px 0 0 7.5%;padding:0;font-size:12px;color:${MUTED}}ul.legend li{display:flex;align-items:center;gap:5px}p.note{margin:0 0 0 7.5%;font-size:11px;color:${MUTED}}`;

const STYLE = `
:root{color-scheme:light}
*{box-sizing:border-box}
body{margin:0;background:${PAPER};color:${INK};font:14px/1.45 system-ui,-apple-system,"Segoe UI",Roboto,"Helvetica Neue",Arial,sans-serif;-webkit-print-color-adjust:exact;print-color-adjust:exact}
main{max-width:1320px;margin:0 auto;padding:20px 24px 8px}
header{border-bottom:3px solid ${INK};padding-bottom:8px;margin-bottom:14px}
h1{font-size:22px;margin:0 0 2px;letter-spacing:.01em}
h2{font-size:16px;margin:22px 0 8px;border-bottom:1px solid ${GRID};padding-bottom:3px}
.sub{color:${MUTED};margin:0}
.facts{display:flex;flex-wrap:wrap;gap:6px 22px;margin:10px 0 0;padding:0;list-style:none}
.facts li{white-space:nowrap}.facts b{font-weight:600}
figure.plot{margin:0 0 14px;break-inside:avoid;page-break-inside:avoid}
figcaption{font-size:13px;color:${MUTED};margin-bottom:2px}figcaption strong{color:${INK};margin-right:6px}
svg text.tick{font-size:11px;fill:${MUTED}}
svg text.event-label{font-size:11px;fill:${INK}}
ul.legend{list-style:none;display:flex;flex-wrap:wrap;gap:4px 16px;margin:2px 0 0 7.5%;padding:0;font-size:12px;color:${MUTED}}
ul.legend li{display:flex;align-items:center;gap:5px}
p.note{margin:0 0 0 7.5%;font-size:11px;color:${MUTED}}
.tables{display:flex;flex-wrap:wrap;gap:10px 28px;align-items:flex-start}
table{border-collapse:collapse;font-size:12.5px;margin:4px 0 10px;break-inside:avoid}
caption{text-align:left;font-weight:600;padding:2px 0 4px}
th,td{border-bottom:1px solid ${GRID};padding:3px 9px;text-align:left;vertical-align:top}
thead th{border-bottom:2px solid ${INK};font-weight:600}
td.num{text-align:right;font-variant-numeric:tabular-nums}
td.when{white-space:nowrap}
tr.truth td{background:#f4f6f8}
td.cause span{display:inline-block;width:9px;height:9px;border-radius:2px;margin-right:5px;vertical-align:baseline}
.incomplete{border:2px solid #b8322a;background:#fbeceb;padding:8px 12px;margin:0 0 14px}
footer{max-width:1320px;margin:18px auto 0;padding:10px 24px 24px;border-top:3px solid ${INK};font-size:12.5px;color:${INK}}
footer .caution{font-weight:600}
footer .made{color:${MUTED}}
.attention{border-left:6px solid #b8322a;background:#fdf3f2;padding:8px 14px;margin:0 0 10px}
.attention.calm{border-left-color:#2f8f5b;background:#f1f8f3}
.attention h3{margin:0 0 4px;font-size:15px}
.attention ul{margin:4px 0 0;padding-left:18px}
.figures{display:flex;flex-wrap:wrap;gap:8px 30px;margin:8px 0 0;padding:0;list-style:none}
.figures li{min-width:180px}.figures .big{display:block;font-size:22px;font-weight:700;color:${INK}}
.figures .bad{color:#b8322a}
section.lane{margin-top:8px}
h3.lane{font-size:15px;margin:14px 0 4px}
@media print{
@page{size:A4 portrait;margin:12mm 10mm}
body{font-size:10.5px}
main{max-width:none;padding:0}
footer{max-width:none;padding:8px 0 0}
h2{break-after:avoid;page-break-after:avoid}
h3{break-after:avoid;page-break-after:avoid}
figure.plot,.tables table,.attention{break-inside:avoid;page-break-inside:avoid}
table.events{font-size:8.5px;width:100%}
table.events td,table.events th{padding:1px 4px}
table.events tr{break-inside:avoid;page-break-inside:avoid}
section.lane{break-before:auto}
ul.legend{font-size:9.5px}
}
`;

/**
 * Renders a report as one self-contained HTML page: inline CSS and SVG only,
 * no script, no font or image to fetch, so it opens offline and prints (A4).
 * From the top: what needs attention (open alarms, their cause, since when,
 * the evidence in words, what moved); one lane per engine with its scores,
 * thresholds, change test and trend evidence on a wall-clock time axis;
 * decisions by cause and the labelled events; the table of events; the
 * metrics in plain words. Every label comes from the glossary. The page
 * carries no date, so equal inputs give equal files.
 */
export function renderReport(content: ReportContent): string {
  const t = content.timeline;
  const events = content.events ?? [];
  const axis = axisOf(t, content.samplePeriod ?? null);
  const lanes = content.lanes ?? [{ name: "", timeline: t }];
  const laneTitle = (name: string): string => (name === "" ? "The engine" : (content.laneTitle?.(name) ?? `Engine for operating mode ${name}`));
  const sections: string[] = [];
  sections.push(headline(content, lanes, laneTitle, axis));
  lanes.forEach((lane, k) => sections.push(lanePlots(lane, k, laneTitle(lane.name), lanes.length, axis, events)));
  const overall = [causeStrip(t, "plot-causes", axis)];
  if (events.length > 0) overall.push(eventStrip(t, events, "plot-events", axis));
  sections.push(`<section class="overall" aria-labelledby="h-overall"><h2 id="h-overall">All engines: decisions and what happened</h2>${overall.join("\n")}</section>`);
  sections.push(`<section aria-labelledby="h-events"><h2 id="h-events">Events</h2>${eventTable(t, axis, events)}</section>`);
  const tables: Table[] = content.metrics === undefined ? [] : metricTables(content.metrics, axis, events);
  tables.push({ caption: "Decisions by action and cause", columns: ["decision", "cause", "samples", "share"], rows: t.counts.map((c) => [ACTION_WORDS[c.action], CAUSE_WORDS[c.cause], c.count, `${((100 * c.count) / Math.max(1, t.count)).toFixed(2)} %`]) });
  sections.push(`<section aria-labelledby="h-metrics"><h2 id="h-metrics">${content.metrics === undefined ? "Counts" : "Measured against the labels"}</h2><div class="tables">${tables.map((tb) => tableHtml(tb)).join("\n")}</div></section>`);

  const span = axis.basis.kind === "samples" ? "" : `${formatTime(axis.basis.kind, axis.basis.secondsAt(0), false)} to ${formatTime(axis.basis.kind, axis.basis.secondsAt(axis.span - 1), false)}`;
  const facts = [["samples", formatNumber(t.count)], ...(span === "" ? [] : [["time", span]]), ...(content.facts ?? []), ["drawn", `${t.buckets} columns of ${t.bucketWidth} sample${t.bucketWidth === 1 ? "" : "s"}`]];
  return [
    "<!DOCTYPE html>",
    '<html lang="en"><head><meta charset="utf-8">',
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    `<title>${escapeXml(content.title)} — leeway report</title>`,
    `<style>${STYLE}</style></head><body><main>`,
    `<header><h1>${escapeXml(content.title)}</h1>${content.subtitle === undefined ? "" : `<p class="sub">${escapeXml(content.subtitle)}</p>`}`,
    `<ul class="facts">${facts.map(([k, v]) => `<li><b>${escapeXml(k as string)}:</b> ${escapeXml(v as string)}</li>`).join("")}</ul></header>`,
    content.incomplete === undefined ? "" : `<p class="incomplete" role="alert"><strong>Incomplete:</strong> ${escapeXml(content.incomplete)}.</p>`,
    sections.join("\n"),
    "</main>",
    `<footer><p class="caution">${escapeXml(SAFETY_CAUTION)}</p><p class="made">Written by leeway ${escapeXml(content.version)}. Plots are decimated for drawing: each column shows the minimum and maximum of the samples it covers.</p></footer>`,
    "</body></html>",
    "",
  ].join("\n");
}
