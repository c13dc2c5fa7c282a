import { CAUSE_COLOURS, INK, MUTED, PAPER, GRID } from "./palette.js";
import { causeStrip, eventStrip, groupSeries, linePlot, type ReportEvent } from "./plots.js";
import { SAFETY_CAUTION } from "./safety.js";
import { escapeXml, formatNumber } from "./scale.js";
import { metricsTables, tableHtml, type Table } from "./tables.js";
import type { ReportTimeline } from "./timeline.js";

/** Everything a report shows. */
export interface ReportContent {
  /** Heading, e.g. "Harbour Lane pump station, skid PS-2". */
  title: string;
  /** One line under the heading (what was replayed, how). */
  subtitle?: string;
  timeline: ReportTimeline;
  /** Labelled events (the truth), when labels were given. */
  events?: readonly ReportEvent[];
  /** Metrics of the replay (any plain object; see {@link metricsTables}). */
  metrics?: unknown;
  /** Facts about the run, printed as a small table (input, mode, samples, ...). */
  facts?: readonly [string, string][];
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
td.cause span{display:inline-block;width:9px;height:9px;border-radius:2px;margin-right:5px;vertical-align:baseline}
.incomplete{border:2px solid #b8322a;background:#fbeceb;padding:8px 12px;margin:0 0 14px}
footer{max-width:1320px;margin:18px auto 0;padding:10px 24px 24px;border-top:3px solid ${INK};font-size:12.5px;color:${INK}}
footer .caution{font-weight:600}
footer .made{color:${MUTED}}
@media print{@page{size:A4 landscape;margin:11mm}main{padding:0}footer{padding:8px 0 0}h2{break-after:avoid}body{font-size:11px}}
`;

/**
 * Renders a report as one self-contained HTML page: inline CSS and SVG only,
 * no script, no font or image to fetch, so it opens offline and prints.
 * Plots: scores over time with score thresholds and alarm/retrain markers,
 * one plot per change test (statistic and threshold), trend evidence,
 * decisions by cause, labelled events; phases as shaded bands behind them.
 * Tables: the metrics, decisions by action and cause, and the decision
 * changes. The page carries no date, so equal inputs give equal files.
 */
export function renderReport(content: ReportContent): string {
  const t = content.timeline;
  const events = content.events ?? [];
  const groups = groupSeries(t.series);
  const plots: string[] = [];
  plots.push(
    linePlot(t, {
      id: "plot-scores",
      title: "Scores",
      caption: "Reconstruction loss of each sample under the live model and the frozen references, min/max per column; triangles mark alarms, retrains and mode switches, coloured by cause.",
      traces: groups.scores,
      height: 280,
      allowLog: true,
      markers: true,
      phaseLegend: true,
      events,
    }),
  );
  for (const test of groups.tests.slice(0, 6)) {
    plots.push(linePlot(t, { id: `plot-test-${slug(test.name)}`, title: `Change test: ${test.name}`, caption: "Statistic and threshold; a change is declared where the statistic crosses the threshold.", traces: test.traces, height: 170, events }));
  }
  for (const trend of groups.trends.slice(0, 4)) {
    const isP = /p_?value$/i.test(trend.name);
    const title = isP ? "Trend evidence: p-values" : trend.name === "z" ? "Trend evidence: Mann-Kendall z" : `Trend evidence: ${trend.name}`;
    plots.push(linePlot(t, { id: `plot-trend-${slug(trend.name)}`, title, traces: trend.traces, height: 150, events, ...(isP ? { yRange: [0, 1] as [number, number] } : {}) }));
  }
  plots.push(causeStrip(t, "plot-causes"));
  if (events.length > 0) plots.push(eventStrip(t, events, "plot-events"));

  const tables: Table[] = [...metricsTables(content.metrics)];
  tables.push({ caption: "Decisions by action and cause", columns: ["action", "cause", "samples", "share"], rows: t.counts.map((c) => [c.action, c.cause, c.count, `${((100 * c.count) / Math.max(1, t.count)).toFixed(2)} %`]) });

  const facts = [["samples", formatNumber(t.count)], ...(content.facts ?? []), ["drawn", `${t.buckets} columns of ${t.bucketWidth} sample${t.bucketWidth === 1 ? "" : "s"}`]];
  return [
    "<!DOCTYPE html>",
    '<html lang="en"><head><meta charset="utf-8">',
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    `<title>${escapeXml(content.title)} — leeway report</title>`,
    `<style>${STYLE}</style></head><body><main>`,
    `<header><h1>${escapeXml(content.title)}</h1>${content.subtitle === undefined ? "" : `<p class="sub">${escapeXml(content.subtitle)}</p>`}`,
    `<ul class="facts">${facts.map(([k, v]) => `<li><b>${escapeXml(k as string)}:</b> ${escapeXml(v as string)}</li>`).join("")}</ul></header>`,
    content.incomplete === undefined ? "" : `<p class="incomplete" role="alert"><strong>Incomplete:</strong> ${escapeXml(content.incomplete)}.</p>`,
    `<section aria-label="plots">${plots.join("\n")}</section>`,
    `<h2>Metrics</h2><section class="tables">${tables.map((tb) => tableHtml(tb)).join("\n")}</section>`,
    `<h2>Decision changes</h2>${transitionsTable(t)}`,
    "</main>",
    `<footer><p class="caution">${escapeXml(SAFETY_CAUTION)}</p><p class="made">Written by leeway ${escapeXml(content.version)}. Plots are decimated for drawing: each column shows the minimum and maximum of the samples it covers.</p></footer>`,
    "</body></html>",
    "",
  ].join("\n");
}

function transitionsTable(t: ReportTimeline): string {
  const hasMode = t.transitions.some((x) => x.mode !== null);
  const rows = t.transitions
    .map(
      (d) =>
        `<tr><td class="num">${d.index}</td>${t.transitions.some((x) => x.time !== null) ? `<td>${escapeXml(d.time === null ? "" : String(d.time))}</td>` : ""}<td>${d.action}</td><td class="cause"><span style="background:${CAUSE_COLOURS[d.cause]}"></span>${d.cause}</td><td>${d.phase}</td>${hasMode ? `<td>${escapeXml(d.mode ?? "")}</td>` : ""}<td class="num">${escapeXml(formatNumber(d.liveScore))}</td><td>${escapeXml(d.detail)}</td></tr>`,
    )
    .join("");
  const hasTime = t.transitions.some((x) => x.time !== null);
  const more = t.transitionsOmitted > 0 ? `<p class="sub">${t.transitionsOmitted} later changes are not listed.</p>` : "";
  return `<table class="data"><caption>Samples where the action, cause or phase changed</caption><thead><tr><th>index</th>${hasTime ? "<th>time</th>" : ""}<th>action</th><th>cause</th><th>phase</th>${hasMode ? "<th>mode</th>" : ""}<th>live score</th><th>evidence</th></tr></thead><tbody>${rows}</tbody></table>${more}`;
}

function slug(text: string): string {
  return text.toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-|-$/g, "") || "x";
}
