import { ACTIONS, CAUSES, PHASES, type Cause, type Phase } from "@leeway/policy";
import { CAUSE_COLOURS, EVENT_COLOURS, GRID, MUTED, PHASE_FILLS, SERIES_COLOURS, STATISTIC_COLOUR, THRESHOLD_COLOUR } from "./palette.js";
import { ACTION_WORDS, CAUSE_SHORT, CAUSE_WORDS, fieldLabel, PHASE_WORDS } from "./glossary.js";
import { escapeXml, px, yScale, type YScale } from "./scale.js";
import { formatTime, timeBasis, timeTicks, type TimeBasis } from "./time-axis.js";
import type { BucketSeries, ReportTimeline } from "./timeline.js";

/** A labelled span of the stream, drawn as truth (the shape of a labelled event). */
export interface ReportEvent {
  cause: "concept-drift" | "degradation" | "anomaly";
  start: number;
  end: number;
  id?: string;
  type?: string;
  label?: string;
}

/** Width of every plot's viewBox and its margins, in SVG px. */
export const PLOT_WIDTH = 1280;
const LEFT = 96;
const RIGHT = 18;
const INNER = PLOT_WIDTH - LEFT - RIGHT;

/** The stream a plot's x axis spans: its first decision index, how many indices, and how their times are known. */
export interface AxisSpan {
  origin: number;
  span: number;
  basis: TimeBasis;
}

/** The axis span of a whole record's timeline, with times from its columns (or a sample period). */
export function axisOf(t: ReportTimeline, samplePeriod: number | null = null): AxisSpan {
  const points: [number, string | number | null][] = [];
  for (let b = 0; b < t.buckets; b++) if (t.bucketTime[b] !== null) points.push([(t.bucketIndex[b] as number) - t.origin, t.bucketTime[b] as string | number]);
  if (t.lastTime !== null && t.lastIndex - t.origin > ((points[points.length - 1]?.[0] ?? -1) as number)) points.push([t.lastIndex - t.origin, t.lastTime]);
  return { origin: t.origin, span: Math.max(1, t.lastIndex - t.origin + 1), basis: timeBasis(points.length === t.buckets + 1 || points.length === t.buckets ? points : [], samplePeriod) };
}

/** Maps sample indices and buckets of a timeline to x coordinates on a shared axis. */
class XAxis {
  readonly #axis: AxisSpan;
  constructor(axis: AxisSpan) {
    this.#axis = axis;
  }
  /** x of a sample index (the decision's `index`). */
  ofIndex(index: number): number {
    return LEFT + (Math.min(Math.max(index - this.#axis.origin, 0), this.#axis.span) / this.#axis.span) * INNER;
  }
  bucketStart(t: ReportTimeline, b: number): number {
    return this.ofIndex(t.origin + b * t.bucketWidth);
  }
  bucketEnd(t: ReportTimeline, b: number): number {
    return this.ofIndex(t.origin + (b + 1) * t.bucketWidth);
  }
  bucketMid(t: ReportTimeline, b: number): number {
    return (this.bucketStart(t, b) + this.bucketEnd(t, b)) / 2;
  }
}

const PHASE_PRIORITY: readonly Phase[] = ["latched", "retraining", "settling", "commissioning", "watching"];

/** The phase drawn for a bucket in which several occurred: the most pressing one. */
export function dominantPhase(mask: number): Phase | null {
  for (const p of PHASE_PRIORITY) if ((mask & (1 << PHASES.indexOf(p))) !== 0) return p;
  return null;
}

function phaseBands(t: ReportTimeline, x: XAxis, top: number, bottom: number): string {
  const out: string[] = [];
  let b = 0;
  while (b < t.buckets) {
    const phase = dominantPhase(t.phaseMask[b] as number);
    let e = b + 1;
    while (e < t.buckets && dominantPhase(t.phaseMask[e] as number) === phase) e++;
    const fill = phase === null ? null : PHASE_FILLS[phase];
    if (fill !== null) out.push(`<rect class="phase" data-phase="${phase}" x="${px(x.bucketStart(t, b))}" y="${top}" width="${px(Math.max(0.6, x.bucketEnd(t, e - 1) - x.bucketStart(t, b)))}" height="${bottom - top}" fill="${fill}"/>`);
    b = e;
  }
  return out.join("");
}

function xTicks(axis: AxisSpan, x: XAxis, top: number, bottom: number): string {
  const out: string[] = [];
  const basis = axis.basis;
  const first = basis.secondsAt(0);
  const last = basis.secondsAt(axis.span);
  const ticks = timeTicks(first, last, 7);
  const fine = ticks.length > 1 && (ticks[1] as number) - (ticks[0] as number) < 60;
  for (const seconds of ticks) {
    const xs = x.ofIndex(axis.origin + basis.indexAt(seconds));
    out.push(`<line x1="${px(xs)}" x2="${px(xs)}" y1="${top}" y2="${bottom}" stroke="${GRID}" stroke-width="1"/>`);
    const anchor = xs > LEFT + INNER - 50 ? "end" : xs < LEFT + 50 ? "start" : "middle";
    out.push(`<text x="${px(xs)}" y="${bottom + 14}" text-anchor="${anchor}" class="tick">${escapeXml(formatTime(basis.kind, seconds, fine))}</text>`);
  }
  return out.join("");
}

function yAxis(scale: YScale, top: number, bottom: number): string {
  const out: string[] = [];
  for (const tick of scale.ticks) {
    const y = scale.y(tick.value);
    if (y < top - 0.5 || y > bottom + 0.5) continue;
    out.push(`<line x1="${LEFT}" x2="${LEFT + INNER}" y1="${px(y)}" y2="${px(y)}" stroke="${GRID}" stroke-width="1"/>`);
    out.push(`<text x="${LEFT - 6}" y="${px(y + 4)}" text-anchor="end" class="tick">${escapeXml(tick.label)}</text>`);
  }
  return out.join("");
}

/**
 * The min/max envelope of a bucketed series as one SVG path: for each bucket
 * a vertical stroke from its minimum to its maximum, joined to the next
 * bucket; a bucket where the field was absent breaks the line.
 */
export function envelopePath(series: BucketSeries, x: (b: number) => number, y: (v: number) => number): string {
  const parts: string[] = [];
  let pen = false;
  for (let b = 0; b < series.min.length; b++) {
    const lo = series.min[b] as number;
    const hi = series.max[b] as number;
    if (!(lo <= hi)) {
      pen = false;
      continue;
    }
    const xs = px(x(b));
    const y1 = px(y(lo));
    const y2 = px(y(hi));
    parts.push(`${pen ? "L" : "M"}${xs} ${y1}`);
    if (y1 !== y2) parts.push(`L${xs} ${y2}`);
    pen = true;
  }
  return parts.join("");
}

function range(series: readonly BucketSeries[]): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const s of series) {
    for (let b = 0; b < s.min.length; b++) {
      const a = s.min[b] as number;
      const c = s.max[b] as number;
      if (a <= c) {
        if (a < lo) lo = a;
        if (c > hi) hi = c;
      }
    }
  }
  return [lo, hi];
}

/** A trace to draw in a {@link linePlot}. */
export interface Trace {
  series: BucketSeries;
  label: string;
  colour: string;
  dashed?: boolean;
}

function legend(items: readonly { label: string; colour: string; dashed?: boolean; box?: boolean }[]): string {
  return `<ul class="legend">${items
    .map((i) => {
      const mark = i.box === true
        ? `<rect x="1" y="2" width="16" height="10" fill="${i.colour}" stroke="${MUTED}" stroke-width="0.5"/>`
        : `<line x1="0" x2="18" y1="7" y2="7" stroke="${i.colour}" stroke-width="${i.dashed === true ? 2 : 2.5}"${i.dashed === true ? ' stroke-dasharray="4 3"' : ""}/>`;
      return `<li><svg width="18" height="14" aria-hidden="true">${mark}</svg>${escapeXml(i.label)}</li>`;
    })
    .join("")}</ul>`;
}

/** Phase band legend entries for the phases that occur. */
function phaseLegend(t: ReportTimeline): { label: string; colour: string; box: boolean }[] {
  let all = 0;
  for (let b = 0; b < t.buckets; b++) all |= t.phaseMask[b] as number;
  return PHASES.filter((p) => (all & (1 << PHASES.indexOf(p))) !== 0 && PHASE_FILLS[p] !== null).map((p) => ({ label: PHASE_WORDS[p], colour: PHASE_FILLS[p] as string, box: true }));
}

/** Options of {@link linePlot}. */
export interface LinePlotOptions {
  id: string;
  title: string;
  /** The shared x axis (default: the timeline's own). */
  axis?: AxisSpan;
  /** What the y axis measures, with its unit (shown beside the plot). */
  unit?: string;
  /** A note under the legend. */
  note?: string;
  caption?: string;
  traces: readonly Trace[];
  height?: number;
  allowLog?: boolean;
  /** Draw alarm/retrain markers along the top edge. */
  markers?: boolean;
  events?: readonly ReportEvent[];
  phases?: boolean;
  /** List the phase bands in the legend (the first plot does). */
  phaseLegend?: boolean;
  /** Fix the y range (for p-values, [0, 1]). */
  yRange?: [number, number];
}

const NOTABLE_ACTIONS = ["alarm", "retrain", "switch-mode", "await-confirmation"] as const;
const MARKER_CAUSE_ORDER: readonly Cause[] = ["anomaly", "degradation", "concept-drift", "known-mode", "operator", "commissioning", "normal"];

/** One figure: a time plot of min/max envelopes over phase bands, with axes, events and legend. */
export function linePlot(t: ReportTimeline, o: LinePlotOptions): string {
  const height = o.height ?? 220;
  const top = o.markers === true ? 22 : 10;
  const bottom = height - 24;
  const axis = o.axis ?? axisOf(t);
  const x = new XAxis(axis);
  const [lo, hi] = o.yRange ?? range(o.traces.map((tr) => tr.series));
  const scale = yScale(lo, hi, top, bottom, o.allowLog ?? false);
  const body: string[] = [];
  if (o.phases !== false) body.push(phaseBands(t, x, top, bottom));
  body.push(yAxis(scale, top, bottom), xTicks(axis, x, top, bottom));
  if (o.unit !== undefined) body.push(`<text x="14" y="${px((top + bottom) / 2)}" transform="rotate(-90 14 ${px((top + bottom) / 2)})" text-anchor="middle" class="tick">${escapeXml(o.unit)}</text>`);
  for (const e of o.events ?? []) {
    const xs = px(x.ofIndex(e.start));
    body.push(`<line class="event-start" x1="${xs}" x2="${xs}" y1="${top}" y2="${bottom}" stroke="${EVENT_COLOURS[e.cause]}" stroke-width="1.2" stroke-dasharray="3 3"/>`);
  }
  for (const tr of o.traces) {
    const d = envelopePath(tr.series, (b) => x.bucketMid(t, b), (v) => scale.y(v));
    body.push(`<path class="trace" data-key="${escapeXml(tr.series.key)}" d="${d}" fill="none" stroke="${tr.colour}" stroke-width="${tr.dashed === true ? 1.6 : 1.3}" stroke-linejoin="round"${tr.dashed === true ? ' stroke-dasharray="6 4"' : ""}/>`);
  }
  if (o.markers === true) body.push(actionMarkers(t, x, top));
  body.push(`<rect x="${LEFT}" y="${top}" width="${INNER}" height="${bottom - top}" fill="none" stroke="${MUTED}" stroke-width="0.8"/>`);
  const items = [...o.traces.map((tr) => ({ label: tr.label, colour: tr.colour, ...(tr.dashed === true ? { dashed: true } : {}) })), ...(o.phaseLegend === true ? phaseLegend(t) : [])];
  const notes = [scale.log ? "log scale" : "", o.note ?? ""].filter((n) => n !== "").join("; ");
  return figure(o.id, o.title, o.caption, height, body.join(""), legend(items) + (notes === "" ? "" : `<p class="note">${escapeXml(notes)}</p>`));
}

function actionMarkers(t: ReportTimeline, x: XAxis, top: number): string {
  const out: string[] = [];
  for (let b = 0; b < t.buckets; b++) {
    const actions = t.actionMask[b] as number;
    const action = NOTABLE_ACTIONS.find((a) => (actions & (1 << ACTIONS.indexOf(a))) !== 0);
    if (action === undefined) continue;
    const causes = t.causeMask[b] as number;
    const cause = MARKER_CAUSE_ORDER.find((c) => (causes & (1 << CAUSES.indexOf(c))) !== 0) ?? "normal";
    const xm = x.bucketMid(t, b);
    out.push(`<path class="marker" data-action="${action}" data-cause="${cause}" d="M${px(xm - 4)} ${top - 12}L${px(xm + 4)} ${top - 12}L${px(xm)} ${top - 3}Z" fill="${CAUSE_COLOURS[cause]}"><title>${escapeXml(`${ACTION_WORDS[action]}: ${CAUSE_WORDS[cause]}`)}</title></path>`);
  }
  return out.join("");
}

/** Lanes of ticks, one per cause, where decisions of that cause were taken. */
export function causeStrip(t: ReportTimeline, id: string, axis: AxisSpan = axisOf(t)): string {
  const causes = CAUSES.filter((c) => c !== "normal");
  const lane = 18;
  const top = 8;
  const height = top + lane * causes.length + 26;
  const bottom = top + lane * causes.length;
  const x = new XAxis(axis);
  const body: string[] = [phaseBands(t, x, top, bottom), xTicks(axis, x, top, bottom)];
  causes.forEach((cause, k) => {
    const y0 = top + k * lane;
    body.push(`<text x="${LEFT - 6}" y="${y0 + lane / 2 + 4}" text-anchor="end" class="tick">${escapeXml(CAUSE_SHORT[cause])}</text>`);
    body.push(`<line x1="${LEFT}" x2="${LEFT + INNER}" y1="${y0 + lane}" y2="${y0 + lane}" stroke="${GRID}"/>`);
    const bit = 1 << CAUSES.indexOf(cause);
    let b = 0;
    while (b < t.buckets) {
      if (((t.causeMask[b] as number) & bit) === 0) {
        b++;
        continue;
      }
      let e = b + 1;
      while (e < t.buckets && ((t.causeMask[e] as number) & bit) !== 0) e++;
      const x0 = x.bucketStart(t, b);
      body.push(`<rect class="cause-mark" data-cause="${cause}" x="${px(x0)}" y="${y0 + 3}" width="${px(Math.max(2, x.bucketEnd(t, e - 1) - x0))}" height="${lane - 6}" fill="${CAUSE_COLOURS[cause]}"/>`);
      b = e;
    }
  });
  body.push(`<rect x="${LEFT}" y="${top}" width="${INNER}" height="${bottom - top}" fill="none" stroke="${MUTED}" stroke-width="0.8"/>`);
  return figure(id, "Decisions by cause, all engines", "Each row marks the samples whose decision gave that cause; learning and holding on normal samples are not marked.", height, body.join(""), legend(phaseLegend(t)));
}

/** The labelled events (the truth), one row per overlapping event, with their labels. */
export function eventStrip(t: ReportTimeline, events: readonly ReportEvent[], id: string, axis: AxisSpan = axisOf(t)): string {
  const rows: number[] = []; // end index of the last event in each row
  const placed = [...events].sort((a, b) => a.start - b.start).map((e) => {
    let row = rows.findIndex((end) => end <= e.start);
    if (row < 0) {
      row = rows.length;
      rows.push(e.end);
    } else rows[row] = e.end;
    return { e, row };
  });
  const lane = 22;
  const top = 8;
  const bottom = top + lane * Math.max(1, rows.length);
  const height = bottom + 26;
  const x = new XAxis(axis);
  const body: string[] = [xTicks(axis, x, top, bottom)];
  for (const { e, row } of placed) {
    const x0 = x.ofIndex(e.start);
    const x1 = Math.max(x0 + 2, x.ofIndex(e.end));
    const y0 = top + row * lane + 2;
    const label = e.label ?? e.id ?? e.type ?? e.cause;
    body.push(`<rect class="event" data-cause="${e.cause}" x="${px(x0)}" y="${y0}" width="${px(x1 - x0)}" height="${lane - 4}" fill="${EVENT_COLOURS[e.cause]}" fill-opacity="0.28" stroke="${EVENT_COLOURS[e.cause]}" stroke-width="1"><title>${escapeXml(`${label}: ${CAUSE_WORDS[e.cause]}`)}</title></rect>`);
    body.push(`<text x="${px(x0 + 3)}" y="${y0 + lane - 9}" class="event-label">${escapeXml(`${label} (${CAUSE_SHORT[e.cause]})`)}</text>`);
  }
  body.push(`<rect x="${LEFT}" y="${top}" width="${INNER}" height="${bottom - top}" fill="none" stroke="${MUTED}" stroke-width="0.8"/>`);
  const items = (["concept-drift", "degradation", "anomaly"] as const).filter((c) => events.some((e) => e.cause === c)).map((c) => ({ label: `what happened: ${CAUSE_SHORT[c]}`, colour: EVENT_COLOURS[c], box: true }));
  return figure(id, "Labelled events", "What truly happened, from the labels; dashed lines mark each event's start on the plots.", height, body.join(""), legend(items));
}

function figure(id: string, title: string, caption: string | undefined, height: number, body: string, after: string): string {
  return `<figure class="plot" id="${escapeXml(id)}"><figcaption><strong>${escapeXml(title)}</strong>${caption === undefined ? "" : ` ${escapeXml(caption)}`}</figcaption><svg viewBox="0 0 ${PLOT_WIDTH} ${height}" width="100%" role="img" aria-label="${escapeXml(title)}" preserveAspectRatio="xMidYMid meet">${body}</svg>${after}</figure>`;
}

/** How evidence fields are grouped into plots. */
export interface PlotGroups {
  scores: Trace[];
  tests: { name: string; traces: Trace[] }[];
  /** One plot per kind of trend number (z, pValue, slope), every field of that kind in it. */
  trends: { name: string; traces: Trace[] }[];
}

/**
 * Sorts a timeline's evidence fields into plots: live and reference scores
 * with their score thresholds; one plot per change test (`<name>.statistic`
 * beside `<name>.threshold`); trend slope, p-value and score gap.
 */
export function groupSeries(series: readonly BucketSeries[]): PlotGroups {
  const live: Trace[] = [];
  const scores: Trace[] = [];
  const tests = new Map<string, Trace[]>();
  const trends = new Map<string, Trace[]>();
  let colour = 0;
  for (const s of series) {
    if (drawnBuckets(s) < 2) continue;
    const key = s.key;
    const last = key.split(".").pop() as string;
    const prefix = key.includes(".") ? key.slice(0, key.lastIndexOf(".")) : "";
    if (key === "liveScore") live.push({ series: s, label: fieldLabel(key), colour: SERIES_COLOURS[0] as string });
    else if (key.startsWith("referenceScores.")) {
      const k = Number(key.split(".")[1]);
      scores.push({ series: s, label: fieldLabel(key), colour: SERIES_COLOURS[1 + (k % (SERIES_COLOURS.length - 1))] as string });
    } else if (/statistic$/i.test(last) || (/threshold$/i.test(last) && prefix !== "")) {
      const list = tests.get(prefix) ?? [];
      const isThreshold = /threshold$/i.test(last);
      list.push({ series: s, label: fieldLabel(key), colour: isThreshold ? THRESHOLD_COLOUR : STATISTIC_COLOUR, ...(isThreshold ? { dashed: true } : {}) });
      tests.set(prefix, list);
    } else if (/threshold$/i.test(last)) scores.push({ series: s, label: fieldLabel(key), colour: THRESHOLD_COLOUR, dashed: true });
    else if (/^(slope|pvalue|p_value|z|tau|s)$/i.test(last)) {
      const list = trends.get(last) ?? [];
      list.push({ series: s, label: fieldLabel(key), colour: SERIES_COLOURS[(colour++ % (SERIES_COLOURS.length - 1)) + 1] as string });
      trends.set(last, list);
    }
  }
  // A threshold without a statistic beside it (an anomaly threshold) is a score threshold.
  for (const [name, traces] of [...tests]) {
    if (traces.some((t) => /statistic$/i.test(t.series.key))) continue;
    for (const t of traces) scores.push(t);
    tests.delete(name);
  }
  return { scores: [...scores, ...live], tests: [...tests].map(([name, traces]) => ({ name, traces })), trends: [...trends].map(([name, traces]) => ({ name, traces })) };
}

/** Buckets in which the series has a value. */
function drawnBuckets(s: BucketSeries): number {
  let n = 0;
  for (let b = 0; b < s.min.length; b++) if ((s.min[b] as number) <= (s.max[b] as number)) n++;
  return n;
}

