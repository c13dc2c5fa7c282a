import { numberInRange, optionsObject, seedOption } from "@leeway/core";
import { defineScenario, type ModeSegment, type Scenario } from "./scenario.js";
import { SPEEDS } from "./suite-presets.js";

/** Options of {@link harbourLane}. */
export interface HarbourLaneOptions {
  /** Samples per simulated hour, in [1, 3600] (default 3600: one frame per second, 604 800 samples for the seven days). */
  scale?: number;
  /** Seed (default "harbour-lane"). */
  seed?: number | string;
}

/** The simulated days of the Harbour Lane timeline. */
export const HARBOUR_LANE_DAYS = 7;

/** The daily speed programme of PS-2: hour of day at which each setting starts. */
export const HARBOUR_LANE_DAY: readonly { hour: number; mode: keyof typeof SPEEDS }[] = [
  { hour: 0, mode: "low" },
  { hour: 6, mode: "mid" },
  { hour: 17, mode: "high" },
  { hour: 21, mode: "mid" },
];

/**
 * The Harbour Lane PS-2 scenario: seven days of the drive-end bearing
 * accelerometer (5 kHz, 1024-sample frames, one frame per sample), the pump
 * following its daily speed programme (00:00 low 990 rpm, 06:00 mid 1485 rpm,
 * 17:00 high 2970 rpm, 21:00 mid), with
 * - day 2, 10:00 (hour 34): a standby compressor is installed in the room;
 *   the noise floor doubles for good (concept drift);
 * - day 4, 00:00 (hour 72) to the end: an outer-race defect grows
 *   exponentially (degradation);
 * - day 6, 14:00 (hour 134), one hour: a rag clogs the impeller (anomaly).
 * Sample index of hour h: round(h·scale); length round(168·scale).
 * @example
 * const s = harbourLane({ scale: 10 });
 * s.length; // 1680
 * s.events.map((e) => e.start); // [340, 720, 1340]
 */
export function harbourLane(options?: HarbourLaneOptions): Scenario {
  const o = optionsObject<HarbourLaneOptions>("harbourLane", options, ["scale", "seed"]);
  const scale = o.scale === undefined ? 3600 : numberInRange("harbourLane", "scale", o.scale, { min: 1, max: 3600 });
  const seed = o.seed === undefined ? "harbour-lane" : seedOption("harbourLane", "seed", o.seed);
  const sample = (hour: number): number => Math.round(hour * scale);
  const schedule: ModeSegment[] = [];
  for (let day = 0; day < HARBOUR_LANE_DAYS; day++) {
    for (const slot of HARBOUR_LANE_DAY) schedule.push({ start: sample(24 * day + slot.hour), mode: slot.mode, rpm: SPEEDS[slot.mode] });
  }
  return defineScenario({
    name: "harbourLane",
    length: sample(24 * HARBOUR_LANE_DAYS),
    seed,
    schedule,
    events: [
      { type: "environment-shift", start: sample(34), noiseFactor: 2, label: "standby compressor installed: noise floor ×2" },
      { type: "degradation", start: sample(72), defect: "outer-race", growth: "exponential", rate: 4, amplitude: 0.4, label: "drive-end bearing outer-race defect (BPFO)" },
      { type: "fault", start: sample(134), duration: Math.max(1, sample(1)), fault: "clog", gain: 4, label: "clog: rag in the impeller" },
    ],
  });
}
