import { sectionLabel } from "./glossary.js";
import type { Lane } from "./lanes.js";
import { groupSeries, linePlot, type AxisSpan, type ReportEvent } from "./plots.js";
import { escapeXml } from "./scale.js";

/**
 * One engine's lane: its scores with its own anomaly threshold and decision
 * markers, its change test with its own threshold, and its trend evidence,
 * over its own phases, on the record's shared time axis.
 */
export function lanePlots(lane: Lane, k: number, title: string, laneCount: number, axis: AxisSpan, events: readonly ReportEvent[]): string {
  const t = lane.timeline;
  const groups = groupSeries(t.series);
  const id = `lane-${k + 1}`;
  const plots: string[] = [];
  const gaps = laneCount > 1 ? " Gaps are spans in which this engine saw no sample (the machine ran in another mode)." : "";
  plots.push(
    linePlot(t, {
      id: `${id}-scores`,
      title: "Scores",
      caption: `Reconstruction loss of each sample under the live model and the frozen references, with the anomaly threshold; triangles mark alarms, retrains and mode switches, coloured by cause.${gaps}`,
      traces: groups.scores,
      axis,
      unit: "score",
      height: 250,
      allowLog: true,
      markers: true,
      phaseLegend: true,
      events,
    }),
  );
  for (const test of groups.tests.slice(0, 3)) {
    plots.push(
      linePlot(t, {
        id: `${id}-change`,
        title: test.name === "change" ? "Change test on the reference score" : sectionLabel(test.name),
        caption: "Statistic and threshold; a change is declared where the statistic crosses the threshold.",
        traces: test.traces,
        axis,
        unit: "σ of the log score",
        height: 160,
        events,
        note: "The engine does not run its change test while it commissions, settles after a change, or holds a latched alarm or an anomaly: those spans are empty.",
      }),
    );
  }
  const z = groups.trends.find((g) => g.name === "z");
  if (z !== undefined) {
    plots.push(linePlot(t, { id: `${id}-trend`, title: "Trend strength", caption: "Mann-Kendall z of the reference score and of the reference–live gap over the long trend window; a slow degradation drives it up.", traces: z.traces, axis, unit: "z", height: 150, events }));
  }
  const p = groups.trends.find((g) => /p_?value/i.test(g.name));
  if (p !== undefined) {
    plots.push(linePlot(t, { id: `${id}-trend-p`, title: "Trend p-values", caption: "Probability of a trend at least this strong without one; small values are evidence of degradation.", traces: p.traces, axis, unit: "probability", height: 130, events, yRange: [0, 1] }));
  }
  return `<section class="lane" aria-labelledby="${id}-h"><h2 id="${id}-h">${escapeXml(title)}</h2>${plots.join("\n")}</section>`;
}
