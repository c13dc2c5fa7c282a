import { RandomSource } from "@leeway/core";
import { defineScenario, degradationSeverity, shiftFraction, type EventSpec, type ModeSegment, type Scenario, type ScenarioEvent } from "@leeway/sim";
import type { EventCause } from "./labels.js";

/** The kinds of event the decision-quality suite measures, one table block each. */
export type QualityKind = "abrupt-shift" | "gradual-shift" | "gain-change" | "recurring-modes" | "degradation" | "fault" | "quiet";

/** Every {@link QualityKind}, in table order. */
export const QUALITY_KINDS: readonly QualityKind[] = ["abrupt-shift", "gradual-shift", "gain-change", "recurring-modes", "degradation", "fault", "quiet"];

/** The two sample rates of the suite: one spectrum per second, one per ten minutes. */
export type QualityRate = "1 s" | "10 min";

/** Every {@link QualityRate}, with its sample period in seconds. */
export const QUALITY_RATES: readonly { rate: QualityRate; samplePeriod: number }[] = [
  { rate: "1 s", samplePeriod: 1 },
  { rate: "10 min", samplePeriod: 600 },
];

/** One true event of a suite scenario: what a correct policy should call it, and when. */
export interface QualityEvent {
  kind: QualityKind;
  cause: EventCause;
  /** First sample. */
  start: number;
  /** First sample after it (exclusive). */
  end: number;
  /** A return to an operating mode already seen in the stream (a known mode, to be switched to without an alarm). */
  knownMode: boolean;
  /** Index of the simulator event behind it (into `scenario.events`), or −1 for a change of operating mode. */
  source: number;
}

/**
 * One scenario of the suite: a simulator scenario (plain data; its seed fixes
 * every sample) and its ground truth.
 */
export interface QualityScenario {
  /** Unique and stable, for example `"degradation/1 s/exponential 6 h/2"`. */
  id: string;
  kind: QualityKind;
  rate: QualityRate;
  /** Seconds between samples. */
  samplePeriod: number;
  /** The size or variant, for example `"noise ×2"` or `"clog 60 s"`. */
  variant: string;
  scenario: Scenario;
  events: QualityEvent[];
}

/** How many seeds the suite runs per variant, by kind. */
export type QualitySeeds = Record<QualityKind, number>;

/** The full suite's seeds per variant (about 200 scenarios). */
export const FULL_SUITE_SEEDS: Readonly<QualitySeeds> = Object.freeze({
  "abrupt-shift": 4,
  "gradual-shift": 4,
  "gain-change": 4,
  "recurring-modes": 6,
  degradation: 3,
  fault: 2,
  quiet: 4,
});

/**
 * Spectrum settings of the suite's simulated sensor: 512-sample frames at
 * 5 kHz summed into 64 bands of 39 Hz (a quarter of the default 256 bands,
 * for speed; the shaft, vane-pass and bearing-defect lines still fall in
 * bands of their own).
 */
export const QUALITY_SPECTRUM = Object.freeze({ frameSize: 512, bins: 64 });

// Samples before the first event: commissioning, calibration and a quiet stretch for the trend windows to fill.
const LEAD_IN: Record<QualityRate, number> = { "1 s": 3000, "10 min": 2000 };
// Samples after a shift or a fault ends, in which absorption, reminders and false alarms are measured.
const TAIL: Record<QualityRate, number> = { "1 s": 6000, "10 min": 3000 };
const QUIET_LENGTH: Record<QualityRate, number> = { "1 s": 50_000, "10 min": 30_000 };
const MODE_SEGMENT: Record<QualityRate, number> = { "1 s": 3000, "10 min": 1500 };
const MID = { mode: "mid", rpm: 1485 };
const HIGH = { mode: "high", rpm: 2970 };
const LOW = { mode: "low", rpm: 990 };

/** seconds → samples at a rate (at least 1). */
const samples = (seconds: number, period: number): number => Math.max(1, Math.round(seconds / period));

interface Variant {
  name: string;
  build(rate: QualityRate, period: number, onset: number): { length: number; schedule: ModeSegment[]; events: EventSpec[] };
}

const single = (lengthAfter: (period: number) => number, event: (onset: number, period: number) => EventSpec): Variant["build"] => (rate, period, onset) => ({
  length: onset + lengthAfter(period),
  schedule: [{ start: 0, ...MID }],
  events: [event(onset, period)],
});

function variants(kind: QualityKind, rate: QualityRate): Variant[] {
  const tail = TAIL[rate];
  switch (kind) {
    case "abrupt-shift":
      return [1.3, 1.6, 2, 3].map((f) => ({
        name: `noise ×${f}`,
        build: single(() => tail, (start) => ({ type: "environment-shift", start, noiseFactor: f, label: `noise floor ×${f}` })),
      }));
    case "gradual-shift": {
      const ramps = rate === "1 s" ? [600, 3600] : [86_400, 604_800]; // 10 min and 1 h; 1 day and 1 week
      return [2, 3].flatMap((f) =>
        ramps.map((seconds) => ({
          name: `noise ×${f} over ${duration(seconds)}`,
          build: single((p) => samples(seconds, p) + tail, (start, p) => ({ type: "environment-shift", start, noiseFactor: f, ramp: samples(seconds, p), label: `noise floor ×${f}, ramped` })),
        })),
      );
    }
    case "gain-change":
      return [0.7, 1.4, 2].map((g) => ({
        name: `gain ×${g}`,
        build: single(() => tail, (start) => ({ type: "environment-shift", start, gain: g, label: `sensor re-mounted: gain ×${g}` })),
      }));
    case "recurring-modes":
      return [
        {
          name: "mid → high → mid → low → mid → high",
          build: (r, _p, onset) => {
            const seg = MODE_SEGMENT[r];
            const order = [MID, HIGH, MID, LOW, MID, HIGH];
            const schedule = order.map((m, k) => ({ start: k === 0 ? 0 : onset + (k - 1) * seg, ...m }));
            return { length: onset + (order.length - 1) * seg, schedule, events: [] };
          },
        },
      ];
    case "degradation": {
      const spans = rate === "1 s" ? [7200, 21_600, 43_200] : [604_800, 2_419_200, 7_776_000]; // 2 h, 6 h, 12 h; 7, 28, 90 days
      return (["exponential", "linear"] as const).flatMap((growth) =>
        spans.map((seconds) => ({
          name: `${growth} over ${duration(seconds)}`,
          build: single((p) => samples(seconds, p), (start, p) => ({ type: "degradation", start, duration: samples(seconds, p), growth, rate: 4, amplitude: 0.4, label: `bearing defect, ${growth}` })),
        })),
      );
    }
    case "fault": {
      const lengths = rate === "1 s" ? [10, 60, 600, 3600] : [600, 1800, 3600, 21_600]; // 10 s .. 1 h; 10 min .. 6 h
      const kinds = [
        { fault: "clog", gain: 4 },
        { fault: "looseness", gain: 3 },
        { fault: "impacts", gain: 2 },
      ] as const;
      return kinds.flatMap((k) =>
        lengths.map((seconds) => ({
          name: `${k.fault} ${duration(seconds)}`,
          build: single((p) => samples(seconds, p) + tail, (start, p) => ({ type: "fault", start, duration: samples(seconds, p), fault: k.fault, gain: k.gain, label: k.fault })),
        })),
      );
    }
    case "quiet":
      return [{ name: "no event", build: (r) => ({ length: QUIET_LENGTH[r], schedule: [{ start: 0, ...MID }], events: [] }) }];
  }
}

/**
 * The seeded scenarios of the decision-quality suite: every {@link QualityKind}
 * at both {@link QUALITY_RATES}, each variant (shift size, ramp, gain,
 * degradation growth and span, fault kind and length) with `seeds[kind]`
 * seeds. The first event starts after a lead-in (3000 samples at 1 s, 2000 at
 * 10 min: commissioning, calibration and a quiet stretch) plus a seeded jitter
 * of up to 10 %; shifts and faults are followed by a tail (6000 / 3000
 * samples) in which absorption, reminders and false alarms are measured.
 * Same arguments ⇒ the same list.
 * @example
 * const suite = qualityScenarios();
 * suite.length; // 192
 * suite[0]?.id; // "abrupt-shift/1 s/noise ×1.3/1"
 */
export function qualityScenarios(seeds: Readonly<QualitySeeds> = FULL_SUITE_SEEDS, suiteSeed = "leeway-quality"): QualityScenario[] {
  const out: QualityScenario[] = [];
  for (const kind of QUALITY_KINDS) {
    for (const { rate, samplePeriod } of QUALITY_RATES) {
      for (const variant of variants(kind, rate)) {
        for (let k = 1; k <= seeds[kind]; k++) out.push(buildScenario(kind, rate, samplePeriod, variant, k, suiteSeed));
      }
    }
  }
  return out;
}

function buildScenario(kind: QualityKind, rate: QualityRate, samplePeriod: number, variant: Variant, k: number, suiteSeed: string): QualityScenario {
  const id = `${kind}/${rate}/${variant.name}/${k}`;
  const seed = `${suiteSeed}/${id}`;
  const lead = LEAD_IN[rate];
  const onset = lead + new RandomSource(seed).derive("onset").integer(Math.round(lead / 10));
  const { length, schedule, events } = variant.build(rate, samplePeriod, onset);
  const scenario = defineScenario({ name: id, length, seed, ...QUALITY_SPECTRUM, schedule, events });
  return { id, kind, rate, samplePeriod, variant: variant.name, scenario, events: truthOf(kind, scenario) };
}

function truthOf(kind: QualityKind, scenario: Scenario): QualityEvent[] {
  const out: QualityEvent[] = [];
  const seen = new Set<string>([scenario.schedule[0]?.mode ?? ""]);
  scenario.schedule.forEach((segment, s) => {
    if (s === 0) return;
    const end = scenario.schedule[s + 1]?.start ?? scenario.length;
    out.push({ kind, cause: "concept-drift", start: segment.start, end, knownMode: seen.has(segment.mode), source: -1 });
    seen.add(segment.mode);
  });
  scenario.events.forEach((e, source) => {
    const cause: EventCause = e.type === "environment-shift" ? "concept-drift" : e.type === "degradation" ? "degradation" : "anomaly";
    out.push({ kind, cause, start: e.start, end: e.end, knownMode: false, source });
  });
  return out.sort((a, b) => a.start - b.start);
}

/**
 * The severity of a suite event at sample i, in [0, 1]: a degradation's
 * severity ({@link degradationSeverity}), a shift's ramped fraction
 * ({@link shiftFraction}), 1 inside a fault or a mode segment; 0 outside the
 * event.
 * @example
 * const s = qualityScenarios()[0] as QualityScenario;
 * eventSeverity(s, s.events[0] as QualityEvent, (s.events[0] as QualityEvent).start); // 1
 */
export function eventSeverity(s: QualityScenario, event: QualityEvent, i: number): number {
  if (i < event.start || i >= event.end) return 0;
  if (event.source < 0) return 1;
  const e = s.scenario.events[event.source] as ScenarioEvent;
  if (e.type === "degradation") return degradationSeverity(e, i);
  if (e.type === "environment-shift") return shiftFraction(e, i);
  return 1;
}

function duration(seconds: number): string {
  if (seconds % 86_400 === 0) return `${seconds / 86_400} d`;
  if (seconds % 3600 === 0) return `${seconds / 3600} h`;
  if (seconds % 60 === 0) return `${seconds / 60} min`;
  return `${seconds} s`;
}

/** The scenarios of the small fixed subset that runs with the unit tests (each also in the full suite). */
export const QUALITY_SUBSET_IDS: readonly string[] = Object.freeze([
  "abrupt-shift/1 s/noise ×2/1",
  "gradual-shift/1 s/noise ×2 over 10 min/1",
  "gain-change/1 s/gain ×2/1",
  "recurring-modes/1 s/mid → high → mid → low → mid → high/1",
  "degradation/1 s/exponential over 2 h/1",
  "fault/1 s/clog 1 min/1",
  "fault/10 min/clog 1 h/1",
  "degradation/10 min/exponential over 7 d/1",
]);

/**
 * The small fixed subset of the suite ({@link QUALITY_SUBSET_IDS}: one
 * scenario of every event kind but the long quiet streams, mostly at one
 * sample per second; about 75 000 samples), for a check that runs in seconds.
 * @example
 * qualitySubset().map((s) => s.kind); // ["abrupt-shift", "gradual-shift", "gain-change", "recurring-modes", "degradation", "fault", "fault", "degradation"]
 */
export function qualitySubset(): QualityScenario[] {
  const one = Object.fromEntries(QUALITY_KINDS.map((k) => [k, 1])) as QualitySeeds;
  const all = qualityScenarios(one);
  return QUALITY_SUBSET_IDS.map((id) => {
    const found = all.find((s) => s.id === id);
    if (found === undefined) throw new Error(`qualitySubset: no scenario ${id}`);
    return found;
  });
}
