import { integerInRange, optionsObject, seedOption } from "@leeway/core";
import { defineScenario, type EventSpec, type ModeSegment, type Scenario } from "./scenario.js";

/** Options of the test-suite presets. */
export interface SuitePresetOptions {
  /** Samples (default 20 000; at least 100). */
  length?: number;
  /** Seed (default 1). */
  seed?: number | string;
}

/** The default length of every test-suite preset. */
export const SUITE_DEFAULT_LENGTH = 20_000;

/** The pump's speed settings: low 990, mid 1485, high 2970 rpm. */
export const SPEEDS = Object.freeze({ low: 990, mid: 1485, high: 2970 });

function suite(preset: string, options: SuitePresetOptions | undefined, build: (length: number) => { schedule: ModeSegment[]; events: EventSpec[] }): Scenario {
  const o = optionsObject<SuitePresetOptions>(preset, options, ["length", "seed"]);
  const length = o.length === undefined ? SUITE_DEFAULT_LENGTH : integerInRange(preset, "length", o.length, 100, 100_000_000);
  const seed = o.seed === undefined ? 1 : seedOption(preset, "seed", o.seed);
  const { schedule, events } = build(length);
  return defineScenario({ name: preset, length, seed, schedule, events });
}

const at = (length: number, fraction: number): number => Math.round(length * fraction);
const mid = (start = 0): ModeSegment => ({ start, mode: "mid", rpm: SPEEDS.mid });

/**
 * Stationary null: the pump at mid speed (1485 rpm) throughout, no event.
 * For in-control run lengths and false-alarm rates.
 * @example
 * new MachineSimulator(stationaryNull({ length: 1000 })).events.length; // 0
 */
export function stationaryNull(options?: SuitePresetOptions): Scenario {
  return suite("stationaryNull", options, () => ({ schedule: [mid()], events: [] }));
}

/**
 * Pure concept drift: mid speed throughout; at 0.5·length the broadband noise
 * floor doubles, abruptly and for good (a standby compressor installed in the
 * room). Events: one environment-shift [0.5·L, L), cause concept drift.
 * @example
 * conceptDrift({ length: 1000 }).events[0]?.start; // 500
 */
export function conceptDrift(options?: SuitePresetOptions): Scenario {
  return suite("conceptDrift", options, (L) => ({
    schedule: [mid()],
    events: [{ type: "environment-shift", start: at(L, 0.5), noiseFactor: 2, label: "compressor installed: noise floor ×2" }],
  }));
}

/**
 * Pure slow degradation: mid speed; from 0.2·length to the end an
 * outer-race defect grows exponentially (rate 4: severity 3 % at a quarter of
 * the event, 12 % at half, 36 % at three quarters), BPFO with three
 * harmonics, modulated at shaft rate. Events: one degradation [0.2·L, L).
 * @example
 * slowDegradation({ length: 1000 }).events[0]?.start; // 200
 */
export function slowDegradation(options?: SuitePresetOptions): Scenario {
  return suite("slowDegradation", options, (L) => ({
    schedule: [mid()],
    events: [{ type: "degradation", start: at(L, 0.2), defect: "outer-race", growth: "exponential", rate: 4, amplitude: 0.4, label: "outer-race defect (BPFO)" }],
  }));
}

/**
 * Drift, then degradation: the noise floor doubles at 0.25·length (concept
 * drift, to be absorbed), then from 0.5·length an outer-race defect grows
 * as in {@link slowDegradation} (never to be absorbed).
 * @example
 * driftThenDegradation({ length: 1000 }).events.map((e) => e.start); // [250, 500]
 */
export function driftThenDegradation(options?: SuitePresetOptions): Scenario {
  return suite("driftThenDegradation", options, (L) => ({
    schedule: [mid()],
    events: [
      { type: "environment-shift", start: at(L, 0.25), noiseFactor: 2, label: "compressor installed: noise floor ×2" },
      { type: "degradation", start: at(L, 0.5), defect: "outer-race", growth: "exponential", rate: 4, amplitude: 0.4, label: "outer-race defect (BPFO)" },
    ],
  }));
}

/**
 * Recurring modes A → B → A: mid speed (1485 rpm, mode "mid") for the first
 * third, high speed (2970 rpm, mode "high") for the second, mid again for
 * the last. Events: two mode-changes, [L/3, 2L/3) labelled "high" and
 * [2L/3, L) labelled "mid" (a return to a known mode).
 * @example
 * recurringModes({ length: 900 }).schedule.map((s) => s.mode); // ["mid", "high", "mid"]
 */
export function recurringModes(options?: SuitePresetOptions): Scenario {
  return suite("recurringModes", options, (L) => ({
    schedule: [mid(), { start: at(L, 1 / 3), mode: "high", rpm: SPEEDS.high }, mid(at(L, 2 / 3))],
    events: [],
  }));
}

/**
 * Abrupt fault: mid speed; a rag clogs the impeller at 0.5·length for
 * 0.025·length samples (vane-pass amplitudes × 4). Events: one fault
 * [0.5·L, 0.525·L), cause anomaly.
 * @example
 * abruptFault({ length: 1000 }).events[0]; // { type: "fault", start: 500, end: 525, fault: "clog", ... }
 */
export function abruptFault(options?: SuitePresetOptions): Scenario {
  return suite("abruptFault", options, (L) => ({
    schedule: [mid()],
    events: [{ type: "fault", start: at(L, 0.5), duration: Math.max(1, at(L, 0.025)), fault: "clog", gain: 4, label: "clog: rag in the impeller" }],
  }));
}
