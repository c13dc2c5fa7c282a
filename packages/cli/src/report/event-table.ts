import { evidenceWords } from "./evidence-words.js";
import { ACTION_WORDS, CAUSE_SHORT, CAUSE_WORDS, PHASE_WORDS } from "./glossary.js";
import { CAUSE_COLOURS } from "./palette.js";
import type { AxisSpan, ReportEvent } from "./plots.js";
import { escapeXml, formatNumber } from "./scale.js";
import { formatTime } from "./time-axis.js";
import type { DecisionTransition, ReportTimeline } from "./timeline.js";

/** Learning or holding a normal or commissioning sample: not an event. */
function routine(d: DecisionTransition): boolean {
  return (d.action === "learn" || d.action === "hold") && (d.cause === "normal" || d.cause === "commissioning") && d.phase !== "latched";
}

/**
 * The table of events: every decision change that is not routine learning
 * (alarms, retrains, mode switches, holds for a cause, phases entered), and
 * the labelled events, in time order, with the time, the engine, what the
 * engine decided, why, and its evidence in words.
 */
export function eventTable(t: ReportTimeline, axis: AxisSpan, labelled: readonly ReportEvent[]): string {
  // Seconds are shown when samples come less than a minute apart.
  const fine = axis.basis.kind !== "samples" && axis.basis.secondsAt(1) - axis.basis.secondsAt(0) < 60;
  const at = (index: number): string => formatTime(axis.basis.kind, axis.basis.secondsAt(index - axis.origin), fine);
  const hasMode = t.transitions.some((x) => x.mode !== null);
  type Row = { index: number; order: number; html: string };
  const rows: Row[] = [];
  for (const d of t.transitions) {
    if (routine(d)) continue;
    const words = evidenceWords(d.evidence, d.cause, 2).join("; ");
    rows.push({
      index: d.index,
      order: 1,
      html: `<tr><td class="when">${escapeXml(at(d.index))}</td>${hasMode ? `<td>${escapeXml(d.mode ?? "")}</td>` : ""}<td>${escapeXml(ACTION_WORDS[d.action])}</td><td class="cause"><span style="background:${CAUSE_COLOURS[d.cause]}"></span>${escapeXml(CAUSE_WORDS[d.cause])}</td><td>${escapeXml(PHASE_WORDS[d.phase])}</td><td class="num">${escapeXml(formatNumber(d.liveScore))}</td><td>${escapeXml(words.length > 220 ? `${words.slice(0, 217)}...` : words)}</td></tr>`,
    });
  }
  for (const e of labelled) {
    const label = e.label ?? e.id ?? e.type ?? CAUSE_SHORT[e.cause];
    rows.push({ index: e.start, order: 0, html: `<tr class="truth"><td class="when">${escapeXml(at(e.start))}</td>${hasMode ? "<td></td>" : ""}<td colspan="3"><strong>What happened:</strong> ${escapeXml(label)} (${escapeXml(CAUSE_WORDS[e.cause])}), until ${escapeXml(at(e.end))}</td><td></td><td></td></tr>` });
  }
  rows.sort((a, b) => a.index - b.index || a.order - b.order);
  const more = t.transitionsOmitted > 0 ? `<p class="sub">${t.transitionsOmitted} later decision changes are not listed.</p>` : "";
  const head = `<tr><th scope="col">time</th>${hasMode ? '<th scope="col">engine</th>' : ""}<th scope="col">decision</th><th scope="col">cause</th><th scope="col">engine state</th><th scope="col">live score</th><th scope="col">evidence</th></tr>`;
  return `<table class="data events"><caption>Alarms, retrains, switches, holds and phases entered, with the labelled events</caption><thead>${head}</thead><tbody>${rows.map((r) => r.html).join("")}</tbody></table>${more}`;
}
