import type { ReplayMetrics } from "@leeway/eval";
import type { Decision } from "@leeway/policy";
import { evidenceWords, movedAndLimit } from "./evidence-words.js";
import { isLimitEvidence, limitSentence } from "./limit-words.js";
import { ACTION_WORDS, CAUSE_WORDS, CAUSE_SHORT } from "./glossary.js";
import type { Lane } from "./lanes.js";
import type { AxisSpan } from "./plots.js";
import { escapeXml, formatNumber } from "./scale.js";
import { formatDuration, formatTime } from "./time-axis.js";
import type { ReportTimeline } from "./timeline.js";

/** When a sample was taken, in the axis's terms, and how long before the record's end. */
function when(axis: AxisSpan, index: number): { at: string; before: string } {
  const b = axis.basis;
  const at = formatTime(b.kind, b.secondsAt(index - axis.origin), false);
  const gap = b.secondsAt(axis.span - 1) - b.secondsAt(index - axis.origin);
  const samples = axis.origin + axis.span - 1 - index;
  return { at, before: b.kind === "samples" ? `${formatNumber(samples)} samples` : `${formatDuration(gap)} (${formatNumber(samples)} samples)` };
}

/** A sample count with its duration on the axis: "40 samples (≈ 6.7 min)". */
export function samplesWithTime(axis: AxisSpan, samples: number): string {
  if (axis.basis.kind === "samples") return `${formatNumber(samples)} samples`;
  const perSample = (axis.basis.secondsAt(axis.span - 1) - axis.basis.secondsAt(0)) / Math.max(1, axis.span - 1);
  return `${formatNumber(samples)} samples (≈ ${formatDuration(samples * perSample)})`;
}

function openItem(title: string, opened: { decision: Decision; time: string | number | null }, last: Decision, axis: AxisSpan): string {
  const d = opened.decision;
  const w = when(axis, d.index);
  const held = (last.evidence as unknown as Record<string, unknown>).sameEvent as { realarmAt: number } | undefined;
  const state = last.phase === "latched" ? `Alarm latched: ${CAUSE_WORDS[last.cause]}` : held !== undefined ? `Acknowledged, still open: ${CAUSE_WORDS[last.cause]}` : `${ACTION_WORDS[last.action]} (${CAUSE_WORDS[last.cause]})`;
  const answered = held !== undefined ? `acknowledged; held as the same event until the score reaches ${formatNumber(held.realarmAt)}` : "not yet acknowledged";
  const evidence = d.evidence as unknown as Record<string, unknown>;
  const { moved, limits } = movedAndLimit(evidence);
  // the time to the user's limit at the current rate: from the latest decision when it still tells it
  const limit = [last.evidence.limit, evidence.limit].find(isLimitEvidence);
  const lines = [
    `<li>since ${escapeXml(w.at)}, ${escapeXml(w.before)} before the end of the record; ${escapeXml(answered)}</li>`,
    `<li>live model score then ${escapeXml(formatNumber(d.evidence.liveScore))}${d.evidence.referenceScores.length > 0 ? `, commissioning reference score ${escapeXml(formatNumber(d.evidence.referenceScores[0] as number))}` : ""}</li>`,
    ...evidenceWords(evidence, d.cause, 3).map((e) => `<li>${escapeXml(e)}</li>`),
    ...moved.map((m) => `<li><strong>What moved</strong> (${escapeXml(m.label)}): ${escapeXml(m.values)}</li>`),
    ...(limit === undefined ? [] : [`<li><strong>Time to the limit</strong>: ${escapeXml(limitSentence(limit, axis))}</li>`]),
    ...limits.map((l) => `<li><strong>Time to the limit</strong> (${escapeXml(l.label)}): ${escapeXml(samplesWithTime(axis, l.samples))}</li>`),
  ];
  return `<div class="attention" role="region" aria-label="${escapeXml(`${title}: ${state}`)}"><h3>${escapeXml(title)} — ${escapeXml(state)}</h3><ul>${lines.join("")}</ul></div>`;
}

/**
 * "Time to the limit" per engine whose latest degradation decision told it
 * (`evidence.limit`) and whose open alarm does not show it already.
 */
function limitItems(lanes: readonly Lane[], laneTitle: (name: string) => string, axis: AxisSpan): string {
  const items: string[] = [];
  for (const lane of lanes) {
    const at = lane.timeline.lastLimit;
    if (at === null || lane.timeline.openedBy !== null) continue;
    const limit = at.decision.evidence.limit;
    if (!isLimitEvidence(limit)) continue;
    items.push(`<li><strong>${escapeXml(laneTitle(lane.name))}</strong>: ${escapeXml(limitSentence(limit, axis))} (as of ${escapeXml(when(axis, at.decision.index).at)})</li>`);
  }
  return items.length === 0 ? "" : `<div class="attention limits" role="region" aria-label="Time to the limit"><h3>Time to the limit at the latest degradation evidence</h3><ul>${items.join("")}</ul></div>`;
}

/** Alarms, retrains and mode switches of the record, counted from its decision changes. */
function episodes(t: ReportTimeline): string {
  const byAction = new Map<string, Map<string, number>>();
  for (const d of t.transitions) {
    if (d.action !== "alarm" && d.action !== "retrain" && d.action !== "switch-mode") continue;
    const m = byAction.get(d.action) ?? new Map<string, number>();
    m.set(d.cause, (m.get(d.cause) ?? 0) + 1);
    byAction.set(d.action, m);
  }
  const part = (action: string, noun: string, plural: string): string => {
    const m = byAction.get(action);
    if (m === undefined) return `no ${plural}`;
    const total = [...m.values()].reduce((a, b) => a + b, 0);
    return `${total} ${total === 1 ? noun : plural} (${[...m].map(([c, k]) => `${k} ${CAUSE_SHORT[c as keyof typeof CAUSE_SHORT]}`).join(", ")})`;
  };
  const cut = t.transitionsOmitted > 0 ? ` (counted over the first ${t.transitions.length} decision changes)` : "";
  return `During the record: ${part("alarm", "alarm", "alarms")}, ${part("retrain", "retrain", "retrains")}, ${part("switch-mode", "switch to a known mode", "switches to a known mode")}${cut}.`;
}

function keyFigures(m: ReplayMetrics): string {
  const learnt = m.learnedDuring.degradation;
  const items = [
    `<li><span class="big${learnt > 0 ? " bad" : ""}">${learnt}</span>samples learnt during a degradation (should be 0: a learnt fault is hidden)</li>`,
    `<li><span class="big${m.learnedDuring.anomaly > 0 ? " bad" : ""}">${m.learnedDuring.anomaly}</span>samples learnt during an anomaly</li>`,
    `<li><span class="big">${m.detected} of ${m.events}</span>labelled events answered, ${m.correctCause} with the true cause</li>`,
    `<li><span class="big">${m.falseAlarmsPer10k === null ? "—" : formatNumber(m.falseAlarmsPer10k)}</span>false alarms per 10 000 samples (${m.falseAlarms} in all)</li>`,
  ];
  return `<ul class="figures">${items.join("")}</ul>`;
}

/**
 * The report's headline: what needs attention at the end of the record —
 * each engine with a latched alarm, a retrain waiting for confirmation or an
 * acknowledged event it still holds,
 * its cause, since when, the evidence in words, and what moved or how long
 * remains to a limit when the evidence says so — then, per engine with a
 * limit, the time to it at the latest degradation decision, the record's alarms,
 * retrains and switches and, with labels, the key figures.
 */
export function headline(content: { timeline: ReportTimeline; metrics?: ReplayMetrics }, lanes: readonly Lane[], laneTitle: (name: string) => string, axis: AxisSpan): string {
  const open: string[] = [];
  for (const lane of lanes) {
    const tl = lane.timeline;
    if (tl.openedBy !== null && tl.last !== null) open.push(openItem(laneTitle(lane.name), tl.openedBy, tl.last, axis));
  }
  const limits = limitItems(lanes, laneTitle, axis);
  const calm = open.length === 0 ? `<div class="attention calm"><h3>Nothing is open at the end of the record</h3><p>No alarm is latched and no retrain waits for confirmation.</p></div>` : "";
  const metrics = content.metrics === undefined ? "" : keyFigures(content.metrics);
  return `<section aria-labelledby="h-attention"><h2 id="h-attention">What needs attention</h2>${open.join("")}${calm}${limits}<p>${escapeXml(episodes(content.timeline))}</p>${metrics}</section>`;
}
