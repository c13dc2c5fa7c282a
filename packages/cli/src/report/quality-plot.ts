import { QUALITY_KINDS, QUALITY_POLICIES, type QualityRate, type QualityRow } from "@leeway/eval";
import { GRID, INK, MUTED, PAPER, SERIES_COLOURS } from "./palette.js";
import { escapeXml, px } from "./scale.js";

const PANEL_W = 620;
const PANEL_H = 230;
const LEFT = 56;
const TOP = 56;
const GAP = 40;
const PAGES_CAP = 4;

interface Panel {
  title: string;
  value(r: QualityRow): number | null;
  max: number;
  ticks: readonly number[];
  label(v: number): string;
}

const PANELS: readonly Panel[] = [
  { title: "right cause (share of events)", value: (r) => r.rightCauseRate, max: 1, ticks: [0, 0.25, 0.5, 0.75, 1], label: (v) => `${Math.round(100 * v)} %` },
  { title: `operator pages per event (capped at ${PAGES_CAP})`, value: (r) => r.pagesPerEvent, max: PAGES_CAP, ticks: [0, 1, 2, 3, 4], label: (v) => (Number.isInteger(v) ? String(v) : v.toFixed(2)) },
];

/**
 * The suite's plot as a standalone SVG: for each sample rate (rows) and each
 * of two metrics (columns: right-cause rate, operator pages per event), one
 * group of bars per event kind, one bar per policy.
 * @example
 * qualityPlot([]).startsWith("<svg"); // true
 */
export function qualityPlot(rows: readonly QualityRow[]): string {
  const rates = [...new Set(rows.map((r) => r.rate))] as QualityRate[];
  const width = LEFT + PANELS.length * (PANEL_W + GAP);
  const height = TOP + rates.length * (PANEL_H + 90) + 10;
  const out: string[] = [
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${width} ${height}" width="${width}" height="${height}" font-family="sans-serif" font-size="12">`,
    `<rect width="${width}" height="${height}" fill="${PAPER}"/>`,
  ];
  QUALITY_POLICIES.forEach((policy, p) => {
    const x = LEFT + p * 170;
    out.push(`<rect x="${x}" y="14" width="12" height="12" fill="${SERIES_COLOURS[p % SERIES_COLOURS.length]}"/><text x="${x + 17}" y="24" fill="${INK}">${escapeXml(policy)}</text>`);
  });
  rates.forEach((rate, ri) => {
    PANELS.forEach((panel, pi) => {
      const x0 = LEFT + pi * (PANEL_W + GAP);
      const y0 = TOP + ri * (PANEL_H + 90) + 20;
      out.push(`<text x="${x0}" y="${y0 - 8}" fill="${INK}" font-weight="bold">${escapeXml(`${panel.title}, one sample per ${rate}`)}</text>`);
      const y = (v: number): number => y0 + PANEL_H - (Math.min(v, panel.max) / panel.max) * PANEL_H;
      for (const t of panel.ticks) {
        out.push(`<line x1="${x0}" x2="${x0 + PANEL_W}" y1="${px(y(t))}" y2="${px(y(t))}" stroke="${GRID}"/><text x="${x0 - 6}" y="${px(y(t) + 4)}" text-anchor="end" fill="${MUTED}">${escapeXml(panel.label(t))}</text>`);
      }
      const group = PANEL_W / QUALITY_KINDS.length;
      const bar = (group - 10) / QUALITY_POLICIES.length;
      QUALITY_KINDS.forEach((kind, k) => {
        const gx = x0 + k * group + 5;
        out.push(`<text x="${px(gx + (group - 10) / 2)}" y="${y0 + PANEL_H + 16}" text-anchor="middle" fill="${MUTED}">${escapeXml(kind)}</text>`);
        QUALITY_POLICIES.forEach((policy, p) => {
          const v = rows.find((r) => r.kind === kind && r.rate === rate && r.policy === policy);
          const value = v === undefined ? null : panel.value(v);
          if (value === null) return;
          const top = y(value);
          out.push(`<rect x="${px(gx + p * bar)}" y="${px(top)}" width="${px(bar - 1)}" height="${px(y0 + PANEL_H - top)}" fill="${SERIES_COLOURS[p % SERIES_COLOURS.length]}"><title>${escapeXml(`${kind}, ${policy}, ${rate}: ${panel.label(value)}`)}</title></rect>`);
        });
      });
      out.push(`<line x1="${x0}" x2="${x0 + PANEL_W}" y1="${y0 + PANEL_H}" y2="${y0 + PANEL_H}" stroke="${MUTED}"/>`);
    });
  });
  out.push("</svg>");
  return out.join("\n") + "\n";
}
