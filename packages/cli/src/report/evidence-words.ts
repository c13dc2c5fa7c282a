import type { Cause } from "@leeway/policy";
import { fieldLabel, sectionLabel, testLabel } from "./glossary.js";
import { formatNumber } from "./scale.js";
import { isLimitEvidence } from "./limit-words.js";

/** Evidence sections that explain each cause, most telling first. */
const SECTIONS_OF: Readonly<Partial<Record<Cause, readonly string[]>>> = {
  anomaly: ["anomaly", "persistentAnomaly"],
  degradation: ["trend", "gap", "change"],
  "concept-drift": ["change", "settling", "outcome", "candidate", "budget"],
  "known-mode": ["switchedTo", "member"],
};

const SKIPPED = new Set(["liveScore", "referenceScores", "mode", "modeIndex", "activeReference"]);

function valueWords(v: unknown): string | null {
  if (v === null || v === undefined) return null;
  if (typeof v === "number") return Number.isFinite(v) ? formatNumber(v) : null;
  if (typeof v === "boolean") return v ? "yes" : "no";
  if (typeof v === "string") return v;
  if (Array.isArray(v)) {
    const parts = v.map(valueWords).filter((x): x is string => x !== null);
    return parts.length === 0 ? null : parts.length > 12 ? `${parts.slice(0, 12).join(", ")}, … (${parts.length})` : parts.join(", ");
  }
  return null;
}

/** One section's fields as "label value" phrases (nulls and empty values left out). */
function sectionWords(key: string, value: unknown): string[] {
  if (typeof value !== "object" || value === null || Array.isArray(value)) {
    const w = valueWords(value);
    return w === null ? [] : [`${fieldLabel(key)}: ${w}`];
  }
  const out: string[] = [];
  const prefix = `${sectionLabel(key).toLowerCase()} `;
  for (const [k, v] of Object.entries(value as Record<string, unknown>)) {
    if (typeof v === "object" && v !== null && !Array.isArray(v)) continue;
    if (key === "change" && k === "test" && typeof v === "string") {
      out.push(testLabel(v));
      continue;
    }
    const w = valueWords(v);
    // Inside its section a field drops the section's name: "Change test: statistic 0.19", not "change test statistic".
    const label = fieldLabel(`${key}.${k}`);
    if (w !== null) out.push(`${label.startsWith(prefix) ? label.slice(prefix.length) : label} ${w}`);
  }
  return out;
}

/**
 * A decision's evidence in plain words, the sections that explain its cause
 * first: `["Anomaly: anomaly threshold (score) 0.266, anomalous samples in a row 5, …", …]`.
 * Every field the evidence holds is shown, with the glossary's words; null
 * values are left out. At most `limit` sections.
 * @example
 * evidenceWords({ liveScore: 0.3, referenceScores: [], anomaly: { threshold: 0.2, run: 5 } }, "anomaly");
 * // ["Anomaly: anomaly threshold (score) 0.2, anomalous samples in a row 5"]
 */
export function evidenceWords(evidence: Record<string, unknown>, cause: Cause, limit = 6): string[] {
  const order = SECTIONS_OF[cause] ?? [];
  const keys = Object.keys(evidence).filter((k) => !SKIPPED.has(k));
  keys.sort((a, b) => rank(order, a) - rank(order, b));
  const out: string[] = [];
  for (const key of keys) {
    const parts = sectionWords(key, evidence[key]);
    if (parts.length === 0) continue;
    const isSection = typeof evidence[key] === "object" && evidence[key] !== null && !Array.isArray(evidence[key]);
    out.push(isSection ? `${sectionLabel(key)}: ${parts.join(", ")}` : (parts[0] as string));
    if (out.length >= limit) break;
  }
  return out;
}

function rank(order: readonly string[], key: string): number {
  const i = order.indexOf(key);
  return i < 0 ? order.length : i;
}

/**
 * Fields of a decision's evidence that name what moved or how long remains,
 * found by their names wherever they sit: a list of features or bands that
 * moved (`moved`, `movedFeatures`, `bands`, …) and an estimate of the time to
 * a limit (`timeToLimit`, `samplesToLimit`, …, in samples). The engine's own
 * `limit` section (a time-to-limit answer) is left to the headline's sentence.
 * @example
 * movedAndLimit({ liveScore: 1, referenceScores: [], degradation: { movedBands: [12, 13], samplesToLimit: 4000 } });
 * // { moved: [{ label: "degradation: moved bands", values: "12, 13" }], limits: [{ label: "degradation: samples to limit", samples: 4000 }] }
 */
export function movedAndLimit(evidence: Record<string, unknown>): { moved: { label: string; values: string }[]; limits: { label: string; samples: number }[] } {
  const moved: { label: string; values: string }[] = [];
  const limits: { label: string; samples: number }[] = [];
  const walk = (value: unknown, path: string, depth: number): void => {
    if (depth > 4 || typeof value !== "object" || value === null) return;
    for (const [k, v] of Object.entries(value as Record<string, unknown>)) {
      const p = path === "" ? k : `${path}.${k}`;
      if (path === "" && k === "limit" && isLimitEvidence(v)) continue;
      if (/moved|bands|features/i.test(k) && Array.isArray(v) && v.length > 0) {
        const w = valueWords(v.map((x) => (typeof x === "object" && x !== null ? (x as Record<string, unknown>).name ?? (x as Record<string, unknown>).index ?? null : x)));
        if (w !== null) moved.push({ label: fieldLabel(p), values: w });
      } else if (/limit/i.test(k) && typeof v === "number" && Number.isFinite(v)) limits.push({ label: fieldLabel(p), samples: v });
      else if (typeof v === "object" && v !== null && !Array.isArray(v)) walk(v, p, depth + 1);
    }
  };
  walk(evidence, "", 0);
  return { moved, limits };
}
