import {
  OptionError,
  finiteArray,
  integerInRange,
  nonNegativeNumber,
  oneOf,
  optionsObject,
  positiveInteger,
  positiveNumber,
  seedOption,
} from "@leeway/core";
import { WINDOW_NAMES, isPowerOfTwo, type WindowName } from "@leeway/signal";
import { PS2_DRIVE_END_BEARING, validateBearing, type BearingGeometry } from "./bearing.js";

/** The longest scenario accepted, in samples (10^8). */
export const MAX_SCENARIO_LENGTH = 100_000_000;

/**
 * The largest level a scenario takes: every amplitude (m/s²), noise standard
 * deviation (m/s²), fault gain, sensor gain and noise factor, the speeds in rpm, the speed
 * gain (rpm / referenceRpm)^speedExponent of every scheduled speed, and the
 * products of the clog gains, of the sensor gains and of the noise factors of events that overlap.
 * Within these bounds (and sampleRate ≥ 1 Hz, reference ≥ 1e-9 m/s²) every
 * frame and spectrum is finite: frames stay below about 10^21 m/s².
 */
export const MAX_SCENARIO_LEVEL = 1e6;

/** The simulated machine: a centrifugal pump on a variable-speed drive. Amplitudes are peak accelerations in m/s². */
export interface MachineSpec {
  /** Impeller vanes; the vane-pass frequency is vanes × shaft rate. */
  vanes: number;
  /** Drive-end bearing geometry (defect frequencies by the kinematic formulas). */
  bearing: BearingGeometry;
  /** Amplitudes of the shaft harmonics 1×, 2×, 3×, ... at `referenceRpm`, m/s². */
  harmonics: number[];
  /** Amplitudes of the vane-pass harmonics 1×, 2×, ... at `referenceRpm`, m/s². */
  vanePass: number[];
  /** The speed at which the amplitudes above hold, rpm. */
  referenceRpm: number;
  /** Every machine amplitude scales by (rpm / referenceRpm)^speedExponent. */
  speedExponent: number;
  /** Speed jitter: relative standard deviation of the shaft rate from frame to frame, in [0, 0.1]. */
  jitter: number;
  /** Sensor noise, white, standard deviation in m/s². */
  sensorNoise: number;
  /** Broadband machine and room noise floor, white, standard deviation in m/s² (environment shifts scale it). */
  floorNoise: number;
}

/** One segment of the operating schedule: from sample `start` the pump runs in `mode` at `rpm`. */
export interface ModeSegment {
  start: number;
  mode: string;
  rpm: number;
}

/** A tone from a neighbouring machine. */
export interface InterferenceTone {
  /** Hz. */
  frequency: number;
  /** Peak, m/s². */
  amplitude: number;
}

/**
 * A change of the surroundings or of the measurement over [start, end): the
 * noise floor scaled, tones added, and/or the sensor's gain changed (a
 * re-mounted or replaced accelerometer: every acceleration it reports is
 * multiplied by `gain`). With `ramp` > 0 the change grows in linearly over its
 * first `ramp` samples (see {@link shiftFraction}); with 0 it is abrupt.
 */
export interface EnvironmentShiftEvent {
  type: "environment-shift";
  start: number;
  /** Exclusive; the previous environment returns at `end` (the stream's length: it never returns). */
  end: number;
  /** Factor on the machine noise floor (1 = unchanged). */
  noiseFactor: number;
  tones: InterferenceTone[];
  /** Factor on everything the sensor reports (1 = unchanged; a re-mount). */
  gain: number;
  /** Samples over which the shift grows in from nothing to its full size (0 = abrupt). */
  ramp: number;
  label: string;
}

/** The bearing component a degradation grows on. */
export type DefectSite = "outer-race" | "inner-race" | "ball" | "cage";

/** A slowly growing bearing defect over [start, end): severity s rises from just above 0 to 1 at its last sample. */
export interface DegradationEvent {
  type: "degradation";
  start: number;
  /** Exclusive; at `end` the bearing is replaced (severity back to 0). */
  end: number;
  defect: DefectSite;
  /** s(u) = u (linear) or (e^{rate·u} − 1)/(e^{rate} − 1) (exponential), u = (i − start + 1)/(end − start). */
  growth: "linear" | "exponential";
  /** r of the exponential law (ignored for linear), in (0, 700]. */
  rate: number;
  /** Peak amplitude of the defect's fundamental at severity 1 and the reference speed, m/s². */
  amplitude: number;
  /** Number of harmonics of the defect frequency (harmonic h has amplitude/h). */
  harmonics: number;
  /** Depth m of the amplitude modulation at shaft rate, (1 + m·cos 2πf_r t): sidebands ±f_r of m/2. */
  modulation: number;
  label: string;
}

/** The kinds of abrupt fault. */
export type FaultKind = "clog" | "looseness" | "impacts";

/** An abrupt fault over [start, end). */
export interface FaultEvent {
  type: "fault";
  start: number;
  end: number;
  /** clog: vane-pass amplitudes × gain; looseness: harmonics 2×.. × gain plus sub- and higher harmonics; impacts: ringing impulses once per revolution. */
  fault: FaultKind;
  gain: number;
  label: string;
}

/** Any scheduled event. */
export type ScenarioEvent = EnvironmentShiftEvent | DegradationEvent | FaultEvent;

/**
 * A complete, validated scenario: plain JSON-safe data, everything a
 * {@link MachineSimulator} needs. Build it with {@link defineScenario} or a preset.
 */
export interface Scenario {
  name: string;
  /** Samples (frames, one spectrum each). */
  length: number;
  seed: number | string;
  /** Accelerometer sampling rate, Hz. */
  sampleRate: number;
  /** Samples per frame (a power of two). */
  frameSize: number;
  /** Spectrum values per sample (the first frameSize/2 FFT bins summed into this many bands). */
  bins: number;
  window: WindowName;
  /** a_ref of the spectrum scaling log1p(band RMS / a_ref), m/s². */
  reference: number;
  machine: MachineSpec;
  schedule: ModeSegment[];
  events: ScenarioEvent[];
}

/** An event as given to {@link defineScenario}: optional fields take their defaults; give `end` or `duration`. */
export type EventSpec =
  | ({ type: "environment-shift"; start: number; end?: number; duration?: number; noiseFactor?: number; tones?: InterferenceTone[]; gain?: number; ramp?: number; label?: string })
  | ({
      type: "degradation";
      start: number;
      end?: number;
      duration?: number;
      defect?: DefectSite;
      growth?: "linear" | "exponential";
      rate?: number;
      amplitude?: number;
      harmonics?: number;
      modulation?: number;
      label?: string;
    })
  | ({ type: "fault"; start: number; end?: number; duration?: number; fault: FaultKind; gain?: number; label?: string });

/** What {@link defineScenario} accepts. */
export interface ScenarioSpec {
  name?: string;
  length: number;
  seed?: number | string;
  sampleRate?: number;
  frameSize?: number;
  bins?: number;
  window?: WindowName;
  reference?: number;
  machine?: Partial<MachineSpec>;
  schedule: ModeSegment[];
  events?: EventSpec[];
}

/** The Harbour Lane PS-2 pump (6 vanes, a 6205-size drive-end bearing). */
export const PS2_MACHINE: Readonly<MachineSpec> = Object.freeze({
  vanes: 6,
  bearing: { ...PS2_DRIVE_END_BEARING },
  harmonics: [0.5, 0.25, 0.12],
  vanePass: [0.35, 0.12],
  referenceRpm: 1485,
  speedExponent: 2,
  jitter: 0.002,
  sensorNoise: 0.02,
  floorNoise: 0.06,
});

const C = "defineScenario";

/**
 * Validates a scenario description and fills in the defaults: 5 kHz
 * sampling, 1024-sample frames, 256 spectrum values, Hann window, reference
 * 1 mm/s² (0.001 m/s²), the PS-2 machine. Sample indices are frame indices.
 * Refuses an empty timeline (length 0 or no schedule), schedules that do not
 * start at 0 or go backwards, events outside the timeline and negative or
 * zero durations, each with an {@link OptionError} naming the field.
 * @example
 * const s = defineScenario({ length: 1000, schedule: [{ start: 0, mode: "mid", rpm: 1485 }] });
 * s.bins; // 256
 */
export function defineScenario(spec: ScenarioSpec): Scenario {
  const o = optionsObject<ScenarioSpec>(C, spec, ["name", "length", "seed", "sampleRate", "frameSize", "bins", "window", "reference", "machine", "schedule", "events"]);
  if (spec === undefined) throw new OptionError(C, "spec", spec, "a scenario description");
  const length = integerInRange(C, "length", o.length, 1, MAX_SCENARIO_LENGTH);
  const name = o.name === undefined ? "scenario" : nonEmptyString("name", o.name);
  const seed = o.seed === undefined ? 1 : seedOption(C, "seed", o.seed);
  const sampleRate = o.sampleRate === undefined ? 5000 : numberInRangeClosed("sampleRate", o.sampleRate, 1, 1e9);
  const frameSize = o.frameSize === undefined ? 1024 : o.frameSize;
  if (!isPowerOfTwo(frameSize) || frameSize < 8 || frameSize > 65536) throw new OptionError(C, "frameSize", frameSize, "a power of two in [8, 65536]");
  const bins = o.bins === undefined ? 256 : integerInRange(C, "bins", o.bins, 1, frameSize / 2);
  const window = o.window === undefined ? "hann" : oneOf(C, "window", o.window, WINDOW_NAMES);
  const reference = o.reference === undefined ? 0.001 : numberInRangeClosed("reference", o.reference, 1e-9, MAX_SCENARIO_LEVEL);
  const machine = validateMachine(o.machine);
  const schedule = validateSchedule(o.schedule, length);
  const events = validateEvents(o.events, length);
  checkLevels(machine, schedule, events, sampleRate);
  return { name, length, seed, sampleRate, frameSize, bins, window, reference, machine, schedule, events };
}

function validateMachine(value: Partial<MachineSpec> | undefined): MachineSpec {
  const m = optionsObject<Partial<MachineSpec>>(C, value, ["vanes", "bearing", "harmonics", "vanePass", "referenceRpm", "speedExponent", "jitter", "sensorNoise", "floorNoise"]);
  const d = PS2_MACHINE;
  return {
    vanes: m.vanes === undefined ? d.vanes : positiveInteger(C, "machine.vanes", m.vanes, 64),
    bearing: validateBearing(C, "machine.bearing", m.bearing ?? d.bearing),
    harmonics: amplitudes("machine.harmonics", m.harmonics ?? d.harmonics),
    vanePass: amplitudes("machine.vanePass", m.vanePass ?? d.vanePass),
    referenceRpm: m.referenceRpm === undefined ? d.referenceRpm : level("machine.referenceRpm", m.referenceRpm, true),
    speedExponent: m.speedExponent === undefined ? d.speedExponent : nonNegativeNumber(C, "machine.speedExponent", m.speedExponent),
    jitter: m.jitter === undefined ? d.jitter : numberInRangeClosed("machine.jitter", m.jitter, 0, 0.1),
    sensorNoise: m.sensorNoise === undefined ? d.sensorNoise : level("machine.sensorNoise", m.sensorNoise, false),
    floorNoise: m.floorNoise === undefined ? d.floorNoise : level("machine.floorNoise", m.floorNoise, false),
  };
}

function amplitudes(option: string, value: unknown): number[] {
  const xs = finiteArray(C, option, value, { atMost: 32 });
  xs.forEach((x, i) => level(`${option}[${i}]`, x, false));
  return Array.from(xs);
}

function validateSchedule(value: unknown, length: number): ModeSegment[] {
  if (!Array.isArray(value) || value.length === 0) throw new OptionError(C, "schedule", value, "a non-empty array of { start, mode, rpm } (an empty timeline cannot be simulated)");
  const rpmOf = new Map<string, number>();
  const out: ModeSegment[] = [];
  value.forEach((item: unknown, i: number) => {
    const path = `schedule[${i}]`;
    const s = optionsObject<ModeSegment>(C, item, ["start", "mode", "rpm"]);
    if (item === undefined) throw new OptionError(C, path, item, "a { start, mode, rpm } segment");
    const start = integerInRange(C, `${path}.start`, s.start, 0, length - 1);
    if (i === 0 && start !== 0) throw new OptionError(C, `${path}.start`, start, "0 (the schedule must cover the timeline from its first sample)");
    const previous = out[i - 1];
    if (previous !== undefined && !(start > previous.start)) throw new OptionError(C, `${path}.start`, start, `greater than schedule[${i - 1}].start = ${previous.start} (segments in time order)`);
    const mode = nonEmptyString(`${path}.mode`, s.mode);
    const rpm = level(`${path}.rpm`, s.rpm, true);
    const known = rpmOf.get(mode);
    if (known !== undefined && known !== rpm) throw new OptionError(C, `${path}.rpm`, rpm, `${known}, the speed mode ${JSON.stringify(mode)} has earlier in the schedule`);
    rpmOf.set(mode, rpm);
    out.push({ start, mode, rpm });
  });
  return out;
}

function validateEvents(value: unknown, length: number): ScenarioEvent[] {
  if (value === undefined) return [];
  if (!Array.isArray(value)) throw new OptionError(C, "events", value, "an array of events");
  return value.map((item: unknown, i: number) => validateEvent(item, i, length));
}

function validateEvent(item: unknown, i: number, length: number): ScenarioEvent {
  const path = `events[${i}]`;
  if (typeof item !== "object" || item === null) throw new OptionError(C, path, item, "an event object");
  const type = oneOf(C, `${path}.type`, (item as { type?: unknown }).type, ["environment-shift", "degradation", "fault"] as const);
  if (type === "environment-shift") {
    const e = optionsObject<Extract<EventSpec, { type: "environment-shift" }>>(C, item, ["type", "start", "end", "duration", "noiseFactor", "tones", "gain", "ramp", "label"]);
    const { start, end } = span(path, e, length, length);
    const noiseFactor = e.noiseFactor === undefined ? 1 : level(`${path}.noiseFactor`, e.noiseFactor, false);
    const gain = e.gain === undefined ? 1 : level(`${path}.gain`, e.gain, true);
    const ramp = e.ramp === undefined ? 0 : integerInRange(C, `${path}.ramp`, e.ramp, 0, end - start);
    const tones = (e.tones ?? []).map((t, k) => {
      const tone = optionsObject<InterferenceTone>(C, t, ["frequency", "amplitude"]);
      return { frequency: numberInRangeClosed(`${path}.tones[${k}].frequency`, tone.frequency, Number.MIN_VALUE, 1e9), amplitude: level(`${path}.tones[${k}].amplitude`, tone.amplitude, false) };
    });
    const label = e.label === undefined ? defaultEnvironmentLabel(noiseFactor, tones, gain) : nonEmptyString(`${path}.label`, e.label);
    return { type, start, end, noiseFactor, tones, gain, ramp, label };
  }
  if (type === "degradation") {
    const e = optionsObject<Extract<EventSpec, { type: "degradation" }>>(C, item, ["type", "start", "end", "duration", "defect", "growth", "rate", "amplitude", "harmonics", "modulation", "label"]);
    const { start, end } = span(path, e, length, length);
    const defect = e.defect === undefined ? "outer-race" : oneOf(C, `${path}.defect`, e.defect, ["outer-race", "inner-race", "ball", "cage"] as const);
    const growth = e.growth === undefined ? "exponential" : oneOf(C, `${path}.growth`, e.growth, ["linear", "exponential"] as const);
    // e^r must stay finite (it overflows beyond r ≈ 709.8) and s(u) > 0 from the first sample
    const rate = e.rate === undefined ? 4 : numberInRangeClosed(`${path}.rate`, e.rate, Number.MIN_VALUE, 700);
    const amplitude = e.amplitude === undefined ? 0.4 : level(`${path}.amplitude`, e.amplitude, true);
    const harmonics = e.harmonics === undefined ? 3 : positiveInteger(C, `${path}.harmonics`, e.harmonics, 10);
    const modulation = e.modulation === undefined ? 0.5 : numberInRangeClosed(`${path}.modulation`, e.modulation, 0, 1);
    const label = e.label === undefined ? `${defect} defect` : nonEmptyString(`${path}.label`, e.label);
    return { type, start, end, defect, growth, rate, amplitude, harmonics, modulation, label };
  }
  const e = optionsObject<Extract<EventSpec, { type: "fault" }>>(C, item, ["type", "start", "end", "duration", "fault", "gain", "label"]);
  const { start, end } = span(path, e, length, undefined);
  const fault = oneOf(C, `${path}.fault`, e.fault, ["clog", "looseness", "impacts"] as const);
  const gain = e.gain === undefined ? 4 : level(`${path}.gain`, e.gain, true);
  const label = e.label === undefined ? fault : nonEmptyString(`${path}.label`, e.label);
  return { type, start, end, fault, gain, label };
}

/** start and exclusive end of an event from `end` or `duration` (defaulting to `fallbackEnd`). */
function span(path: string, e: { start?: unknown; end?: unknown; duration?: unknown }, length: number, fallbackEnd: number | undefined): { start: number; end: number } {
  const start = integerInRange(C, `${path}.start`, e.start, 0, length - 1);
  if (e.end !== undefined && e.duration !== undefined) throw new OptionError(C, `${path}.duration`, e.duration, "left out when end is given (give end or duration, not both)");
  let end: number;
  if (e.duration !== undefined) {
    if (typeof e.duration !== "number" || !Number.isInteger(e.duration) || e.duration <= 0) {
      throw new OptionError(C, `${path}.duration`, e.duration, "a positive integer number of samples (durations cannot be zero or negative)");
    }
    end = start + e.duration;
  } else if (e.end !== undefined) {
    if (typeof e.end !== "number" || !Number.isInteger(e.end) || e.end <= start) {
      throw new OptionError(C, `${path}.end`, e.end, `an integer > start = ${start} (an event's duration end − start must be positive)`);
    }
    end = e.end;
  } else if (fallbackEnd !== undefined) {
    end = fallbackEnd;
  } else {
    throw new OptionError(C, `${path}.end`, e.end, "an end sample or a duration (a fault must say when it stops)");
  }
  if (end > length) throw new OptionError(C, `${path}.end`, end, `at most the scenario length ${length}`);
  return { start, end };
}

/** A level in (0, MAX_SCENARIO_LEVEL] (`positive`) or [0, MAX_SCENARIO_LEVEL]. */
function level(option: string, value: unknown, positive: boolean): number {
  if (typeof value !== "number" || !Number.isFinite(value) || value > MAX_SCENARIO_LEVEL || (positive ? !(value > 0) : value < 0)) {
    throw new OptionError(C, option, value, `a finite number in ${positive ? "(0" : "[0"}, ${MAX_SCENARIO_LEVEL}]`);
  }
  return value;
}

/**
 * The bounds that span several fields: the speed gain of every scheduled
 * speed, the products of overlapping clog gains and noise factors, and (with
 * impacts) a shaft rate below the Nyquist frequency, so that a frame holds at
 * most one impact per two samples.
 */
function checkLevels(machine: MachineSpec, schedule: ModeSegment[], events: ScenarioEvent[], sampleRate: number): void {
  const impacts = events.some((e) => e.type === "fault" && e.fault === "impacts");
  schedule.forEach((s, i) => {
    const gain = Math.pow(s.rpm / machine.referenceRpm, machine.speedExponent);
    if (!(gain <= MAX_SCENARIO_LEVEL)) throw new OptionError(C, `schedule[${i}].rpm`, s.rpm, `a speed whose gain (rpm / machine.referenceRpm)^machine.speedExponent is at most ${MAX_SCENARIO_LEVEL}`);
    if (impacts && !(s.rpm / 60 <= sampleRate / 2)) throw new OptionError(C, `schedule[${i}].rpm`, s.rpm, `at most ${sampleRate * 30} rpm: with an impacts fault the shaft rate must stay below the Nyquist frequency`);
  });
  const clogs = events.map((e, i) => ({ e, i })).filter((x) => x.e.type === "fault" && x.e.fault === "clog");
  const clog = largestOverlapProduct(clogs.map(({ e, i }) => ({ start: e.start, end: e.end, factor: (e as FaultEvent).gain, index: i })));
  if (clog !== null) throw new OptionError(C, `events[${clog.index}].gain`, clog.factor, `a gain whose product with the clog gains overlapping it is at most ${MAX_SCENARIO_LEVEL}`);
  const shifts = events.map((e, i) => ({ e, i })).filter((x) => x.e.type === "environment-shift");
  const noise = largestOverlapProduct(shifts.map(({ e, i }) => ({ start: e.start, end: e.end, factor: (e as EnvironmentShiftEvent).noiseFactor, index: i })));
  if (noise !== null) throw new OptionError(C, `events[${noise.index}].noiseFactor`, noise.factor, `a factor whose product with the noise factors overlapping it is at most ${MAX_SCENARIO_LEVEL}`);
  const sensor = largestOverlapProduct(shifts.map(({ e, i }) => ({ start: e.start, end: e.end, factor: (e as EnvironmentShiftEvent).gain, index: i })));
  if (sensor !== null) throw new OptionError(C, `events[${sensor.index}].gain`, sensor.factor, `a sensor gain whose product with the sensor gains overlapping it is at most ${MAX_SCENARIO_LEVEL}`);
}

/** The first interval at whose start the product of the factors in force passes MAX_SCENARIO_LEVEL (a sweep over starts and ends in log space), or null. */
function largestOverlapProduct(spans: { start: number; end: number; factor: number; index: number }[]): { index: number; factor: number } | null {
  const points = spans.flatMap((s) => [
    { at: s.start, log: Math.log(s.factor), span: s, isStart: true },
    { at: s.end, log: -Math.log(s.factor), span: s, isStart: false },
  ]);
  // ends before starts at the same sample: an event's end is exclusive
  points.sort((a, b) => a.at - b.at || Number(a.isStart) - Number(b.isStart));
  const limit = Math.log(MAX_SCENARIO_LEVEL) + 1e-9;
  let zeros = 0; // factors of 0 in force make the product 0
  let sum = 0;
  for (const p of points) {
    if (p.span.factor === 0) zeros += p.isStart ? 1 : -1;
    else sum += p.log;
    if (p.isStart && zeros === 0 && sum > limit) return { index: p.span.index, factor: p.span.factor };
  }
  return null;
}

function nonEmptyString(option: string, value: unknown): string {
  if (typeof value !== "string" || value.length === 0) throw new OptionError(C, option, value, "a non-empty string");
  return value;
}

function numberInRangeClosed(option: string, value: unknown, min: number, max: number): number {
  if (typeof value !== "number" || !Number.isFinite(value) || value < min || value > max) throw new OptionError(C, option, value, `a finite number in [${min}, ${max}]`);
  return value;
}

function defaultEnvironmentLabel(noiseFactor: number, tones: InterferenceTone[], gain: number): string {
  const parts: string[] = [];
  if (noiseFactor !== 1) parts.push(`noise floor ×${noiseFactor}`);
  if (gain !== 1) parts.push(`sensor gain ×${gain}`);
  for (const t of tones) parts.push(`tone ${t.frequency} Hz`);
  return parts.length === 0 ? "environment shift" : parts.join(", ");
}
