import { LeewayError, OptionError, RandomSource, SnapshotError, envelope, openSnapshot, requireNumber, type RandomSourceState, type Snapshot } from "@leeway/core";
import { SpectrumAnalyzer, reduceBins } from "@leeway/signal";
import { bearingOrders, type BearingOrders } from "./bearing.js";
import { defineScenario, type DegradationEvent, type Scenario, type ScenarioEvent, type ScenarioSpec } from "./scenario.js";
import { shiftFraction } from "./shift-fraction.js";
import { addModulated, addRinging, addTone } from "./synthesis.js";
import { truthEvents, type SampleTruth, type TruthEvent } from "./truth.js";

/** One simulated sample in spectra mode. */
export interface SimulatedSpectrum {
  index: number;
  /** `scenario.bins` values log1p(band RMS / reference); a reused buffer: copy it to keep it. */
  spectrum: Float64Array;
  truth: SampleTruth;
}

/** One simulated sample in raw mode. */
export interface SimulatedFrame {
  index: number;
  /** `scenario.frameSize` accelerations in m/s²; a reused buffer: copy it to keep it. */
  frame: Float64Array;
  truth: SampleTruth;
}

const NOISE_BANK_BITS = 16; // at least 65 536 Gaussian deviates (4 frames' worth for long frames)
const LOOSENESS_HALF_ORDERS = [0.5, 1.5, 2.5];
const RESONANCE_HZ = 1800; // structural resonance excited by impacts
const RESONANCE_DECAY_S = 0.001; // ringing time constant, s
const IMPACT_AMPLITUDE = 1; // m/s² per unit of fault gain, at the reference speed

/**
 * A seeded simulator of the drive-end accelerometer of a centrifugal pump,
 * one frame per sample, with ground truth per sample.
 *
 * Each frame (frameSize samples at sampleRate, m/s²) is a sum of
 * - shaft harmonics h·f_r and vane-pass harmonics m·z·f_r (z vanes), with
 *   f_r = rpm/60·(1 + jitter·ε), ε ~ N(0, 1) drawn per frame, and every
 *   amplitude scaled by (rpm / referenceRpm)^speedExponent;
 * - white noise of standard deviation √(σ_sensor² + (κ·σ_floor)²), κ the
 *   product of the active environment shifts' noise factors, plus their tones
 *   (a ramped shift's factors and tones grow in with {@link shiftFraction});
 * - for each active degradation, the defect frequency f_d = order·f_r
 *   (BPFO, BPFI, 2·BSF or FTF from the bearing geometry) and its harmonics,
 *   amplitude A·s/h, modulated at shaft rate (1 + m·cos 2πf_r t);
 * - for each active fault: clog (vane-pass × gain), looseness (2×.. × gain,
 *   plus ½-orders and harmonics up to 8×) or impacts (once per revolution, a
 *   ringing at 1.8 kHz of gain × 1 m/s², decaying with τ = 1 ms).
 * The whole frame is then multiplied by the product of the active shifts'
 * sensor gains (a re-mounted sensor). Every tone has a random phase per frame. The noise comes from a bank of
 * max(2^16, 4·frameSize) Gaussian deviates drawn once from the seed; each frame mixes two
 * non-overlapping random segments of it, (g_a + g_b)/√2, which keeps the
 * deviates exactly N(0, 1) and makes 10^5-frame runs cheap.
 *
 * Spectra mode runs each frame through @leeway/signal: window (Hann by
 * default), one-sided power spectrum (ENBW-corrected), the first frameSize/2
 * bins summed into `bins` bands of equal width, and each band's RMS
 * a_b = √(Σ P_k) mapped to log1p(a_b / a_ref) with a_ref = `reference`
 * (default 1 mm/s²): 0 for silence, ≈ 1.6 for the default noise floor per band,
 * ≈ 5–7 for the shaft and vane-pass lines.
 * Same scenario (including its seed) ⇒ identical frames and spectra.
 * @example
 * const sim = new MachineSimulator(stationaryNull({ length: 100, seed: 1 }));
 * const first = sim.next();
 * first?.spectrum.length; // 256
 * first?.truth.mode; // "mid"
 */
export class MachineSimulator {
  static readonly kind = "leeway.sim.machine-simulator";
  static readonly version = 1;
  /** The validated scenario (plain data). */
  readonly scenario: Scenario;
  /** The scenario's events in start order. */
  readonly events: TruthEvent[];
  #rng: RandomSource;
  readonly #bank: Float64Array;
  readonly #bankSize: number; // a power of two ≥ 4·frameSize
  readonly #frame: Float64Array;
  readonly #defect: Float64Array; // scratch: a defect's lines before modulation
  readonly #power: Float64Array;
  readonly #powerBelowNyquist: Float64Array;
  readonly #bands: Float64Array;
  readonly #spectrum: Float64Array;
  readonly #analyzer: SpectrumAnalyzer;
  readonly #orders: BearingOrders;
  readonly #environmentOrdinal: Int32Array; // per scenario event: 1-based ordinal among environment shifts, 0 otherwise
  #index = 0;
  #segment = 0;

  /** @param scenario a preset's result or any {@link ScenarioSpec} (validated by {@link defineScenario}). */
  constructor(scenario: Scenario | ScenarioSpec) {
    this.scenario = defineScenario(scenario);
    const s = this.scenario;
    this.events = truthEvents(s);
    this.#rng = new RandomSource(s.seed);
    // the bank plus a copy of its first frameSize deviates, so that a segment never wraps
    const bankSize = Math.max(1 << NOISE_BANK_BITS, 4 * s.frameSize);
    this.#bankSize = bankSize;
    const bank = new Float64Array(bankSize + s.frameSize);
    this.#rng.derive("noise-bank").fillNormal(bank.subarray(0, bankSize));
    bank.copyWithin(bankSize, 0, s.frameSize);
    this.#bank = bank;
    this.#frame = new Float64Array(s.frameSize);
    this.#defect = new Float64Array(s.frameSize);
    this.#analyzer = new SpectrumAnalyzer({ size: s.frameSize, sampleRate: s.sampleRate, window: s.window });
    this.#power = new Float64Array(this.#analyzer.bins);
    this.#powerBelowNyquist = this.#power.subarray(0, s.frameSize / 2);
    this.#bands = new Float64Array(s.bins);
    this.#spectrum = new Float64Array(s.bins);
    this.#orders = bearingOrders(s.machine.bearing);
    const order = new Int32Array(s.events.length);
    const shifts = s.events.map((e, i) => ({ e, i })).filter((x) => x.e.type === "environment-shift");
    shifts.sort((a, b) => a.e.start - b.e.start || a.i - b.i).forEach((x, k) => (order[x.i] = k + 1));
    this.#environmentOrdinal = order;
  }

  /**
   * The whole state as plain data: the scenario, the next index and the
   * random source. {@link MachineSimulator.restore} continues with the same
   * bytes as this simulator would.
   */
  snapshot(): Snapshot<MachineSimulatorState> {
    return envelope(MachineSimulator.kind, MachineSimulator.version, {
      scenario: JSON.parse(JSON.stringify(this.scenario)) as Scenario,
      index: this.#index,
      random: this.#rng.snapshot(),
    });
  }

  /**
   * Rebuilds a simulator from {@link MachineSimulator.snapshot}. The scenario
   * must be in the complete form {@link defineScenario} returns (every field
   * present, nothing left to a default), so a damaged scenario is refused
   * instead of silently completed.
   */
  static restore(snapshot: unknown): MachineSimulator {
    const r = openSnapshot(snapshot, MachineSimulator.kind, MachineSimulator.version);
    const raw = r.raw("scenario");
    let scenario: Scenario;
    try {
      scenario = defineScenario(raw as ScenarioSpec);
    } catch (error) {
      if (error instanceof LeewayError) r.fail("scenario", `is not a valid scenario (${error.message})`);
      throw error;
    }
    if (!sameData(scenario, raw)) r.fail("scenario", "must be a complete scenario as defineScenario returns it (a field is missing or out of place)");
    const index = r.integer("index", 0, scenario.length);
    let random: RandomSource;
    try {
      random = RandomSource.restore(r.raw("random"));
    } catch (error) {
      if (error instanceof SnapshotError) r.fail("random", `is not a valid random source (${error.message})`);
      throw error;
    }
    if (random.seed !== String(scenario.seed)) r.fail("random", `must come from the scenario's seed ${JSON.stringify(String(scenario.seed))}, got seed ${JSON.stringify(random.seed)}`);
    const sim = new MachineSimulator(scenario);
    sim.#rng = random;
    sim.#index = index;
    return sim;
  }

  /** Samples in the scenario. */
  get length(): number {
    return this.scenario.length;
  }

  /** The index of the next sample (= samples produced so far). */
  get index(): number {
    return this.#index;
  }

  /** Hz per FFT bin of the frames (sampleRate / frameSize). */
  get binWidth(): number {
    return this.#analyzer.binWidth;
  }

  /** The next sample as a spectrum, or null after the last one. */
  next(): SimulatedSpectrum | null {
    const raw = this.frame();
    if (raw === null) return null;
    this.#analyzer.power(raw.frame, this.#power);
    reduceBins(this.#powerBelowNyquist, this.scenario.bins, this.#bands, "sum");
    const inv = 1 / this.scenario.reference;
    const out = this.#spectrum;
    // spectrum_b = log1p(a_b / a_ref), a_b = √(band energy)
    for (let b = 0; b < out.length; b++) out[b] = Math.log1p(Math.sqrt(this.#bands[b] as number) * inv);
    return { index: raw.index, spectrum: out, truth: raw.truth };
  }

  /** The next sample as a raw acceleration frame (m/s²), or null after the last one. */
  frame(): SimulatedFrame | null {
    const i = this.#index;
    if (i >= this.scenario.length) return null;
    this.#synthesize(i);
    this.#index++;
    return { index: i, frame: this.#frame, truth: this.truthAt(i) };
  }

  /** The ground truth at sample i (pure: does not advance the simulator). */
  truthAt(i: number): SampleTruth {
    const s = this.scenario;
    if (!Number.isInteger(i) || i < 0 || i >= s.length) throw new OptionError("MachineSimulator", "i", i, `a sample index, an integer in [0, ${s.length - 1}]`);
    let environment = 0;
    let environmentStart = -1;
    let severity = 0;
    let fault: string | null = null;
    for (let k = 0; k < s.events.length; k++) {
      const e = s.events[k] as ScenarioEvent;
      if (i < e.start || i >= e.end) continue;
      if (e.type === "environment-shift") {
        if (e.start >= environmentStart) {
          environmentStart = e.start;
          environment = this.#environmentOrdinal[k] as number;
        }
      } else if (e.type === "degradation") severity = Math.max(severity, degradationSeverity(e, i));
      else if (fault === null) fault = e.fault;
    }
    return { index: i, mode: this.#segmentAt(i).mode, environment, severity, fault };
  }

  #segmentAt(i: number): { mode: string; rpm: number } {
    const schedule = this.scenario.schedule;
    let k = this.#segment;
    if ((schedule[k]?.start ?? 0) > i) k = 0;
    while (k + 1 < schedule.length && (schedule[k + 1] as { start: number }).start <= i) k++;
    this.#segment = k;
    return schedule[k] as { mode: string; rpm: number };
  }

  #synthesize(i: number): void {
    const s = this.scenario;
    const m = s.machine;
    const rng = this.#rng;
    const buf = this.#frame;
    const n = buf.length;
    const rpm = this.#segmentAt(i).rpm;
    const fr = (rpm / 60) * (1 + m.jitter * rng.normal()); // shaft rate, Hz
    const gain = Math.pow(rpm / m.referenceRpm, m.speedExponent);
    const toOmega = (2 * Math.PI) / s.sampleRate;

    let noiseFactor = 1;
    let sensorGain = 1;
    let clog = 1;
    let looseness = 0;
    let impacts = 0;
    for (const e of s.events) {
      if (i < e.start || i >= e.end) continue;
      if (e.type === "environment-shift") {
        const f = shiftFraction(e, i);
        noiseFactor *= 1 + (e.noiseFactor - 1) * f;
        sensorGain *= 1 + (e.gain - 1) * f;
      }
      else if (e.type === "fault") {
        if (e.fault === "clog") clog *= e.gain;
        else if (e.fault === "looseness") looseness = Math.max(looseness, e.gain);
        else impacts = Math.max(impacts, e.gain);
      }
    }

    // noise: two non-overlapping segments of the bank, (g_a + g_b)/√2
    const bank = this.#bank;
    const size = this.#bankSize;
    const sd = Math.sqrt(m.sensorNoise * m.sensorNoise + (noiseFactor * m.floorNoise) ** 2) * Math.SQRT1_2;
    const a = rng.integer(size);
    const b = (a + n + rng.integer(size - 2 * n)) & (size - 1);
    for (let t = 0; t < n; t++) buf[t] = sd * ((bank[a + t] as number) + (bank[b + t] as number));

    const twoPi = 2 * Math.PI;
    // shaft harmonics h·f_r
    for (let h = 0; h < m.harmonics.length; h++) {
      const amp = (m.harmonics[h] as number) * gain * (h > 0 && looseness > 0 ? looseness : 1);
      addTone(buf, (h + 1) * fr * toOmega, amp, twoPi * rng.next());
    }
    // vane pass k·z·f_r
    for (let k = 0; k < m.vanePass.length; k++) addTone(buf, (k + 1) * m.vanes * fr * toOmega, (m.vanePass[k] as number) * gain * clog, twoPi * rng.next());
    if (looseness > 0) {
      const base = (m.harmonics[0] ?? 0.1) * gain * looseness;
      for (const order of LOOSENESS_HALF_ORDERS) addTone(buf, order * fr * toOmega, 0.05 * base, twoPi * rng.next());
      for (let h = m.harmonics.length + 1; h <= 8; h++) addTone(buf, h * fr * toOmega, 0.08 * base, twoPi * rng.next());
    }
    const phase = (): number => twoPi * rng.next();
    for (const e of s.events) {
      if (i < e.start || i >= e.end) continue;
      if (e.type === "environment-shift") {
        const f = shiftFraction(e, i);
        for (const tone of e.tones) addTone(buf, tone.frequency * toOmega, tone.amplitude * f, phase());
      } else if (e.type === "degradation") {
        const severity = degradationSeverity(e, i);
        if (severity <= 0) continue;
        const fd = this.#defectOrder(e) * fr; // defect frequency, Hz
        const lines = this.#defect.fill(0);
        for (let h = 1; h <= e.harmonics; h++) addTone(lines, h * fd * toOmega, (e.amplitude * severity * gain) / h, phase());
        // (1 + m·cos 2πf_r t)·sin(2πf t) = sin(2πf t) + (m/2)·[sin(2π(f+f_r)t) + sin(2π(f−f_r)t)]
        addModulated(buf, lines, fr * toOmega, e.modulation, phase());
      }
    }
    if (impacts > 0) {
      const period = s.sampleRate / fr; // samples per revolution
      const omega = RESONANCE_HZ * toOmega;
      const r = Math.exp(-1 / (RESONANCE_DECAY_S * s.sampleRate));
      for (let at = rng.next() * period; at < n; at += period) {
        addRinging(buf, Math.floor(at), IMPACT_AMPLITUDE * impacts * gain * (0.8 + 0.4 * rng.next()), omega, r);
      }
    }
    if (sensorGain !== 1) for (let t = 0; t < n; t++) buf[t] = (buf[t] as number) * sensorGain;
  }

  #defectOrder(e: DegradationEvent): number {
    const o = this.#orders;
    switch (e.defect) {
      case "outer-race":
        return o.bpfo;
      case "inner-race":
        return o.bpfi;
      case "ball":
        return 2 * o.bsf;
      default:
        return o.ftf;
    }
  }
}

/** The plain state of a {@link MachineSimulator}. */
export interface MachineSimulatorState {
  scenario: Scenario;
  index: number;
  random: Snapshot<RandomSourceState>;
}

/** Structural equality of plain JSON data (objects compared key by key, in any order). */
function sameData(a: unknown, b: unknown): boolean {
  if (a === b) return true;
  if (typeof a !== "object" || typeof b !== "object" || a === null || b === null) return false;
  if (Array.isArray(a) !== Array.isArray(b)) return false;
  const ka = Object.keys(a);
  const kb = Object.keys(b);
  if (ka.length !== kb.length) return false;
  for (const k of ka) {
    if (!Object.prototype.hasOwnProperty.call(b, k)) return false;
    if (!sameData((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k])) return false;
  }
  return true;
}

/**
 * Severity s ∈ (0, 1] of a degradation at sample i inside [start, end):
 * u = (i − start + 1)/(end − start), so that s > 0 from the first sample and
 * s = 1 at the last; linear s = u, exponential s = (e^{r·u} − 1)/(e^{r} − 1).
 * Strictly increasing in i over the event; 0 outside it.
 * @example
 * degradationSeverity({ start: 0, end: 10, growth: "linear", rate: 4 }, 4); // 0.5
 */
export function degradationSeverity(e: Pick<DegradationEvent, "start" | "end" | "growth" | "rate">, i: number): number {
  requireNumber("degradationSeverity", "i", i);
  if (i < e.start || i >= e.end) return 0;
  const u = (i - e.start + 1) / (e.end - e.start);
  return e.growth === "linear" ? u : Math.expm1(e.rate * u) / Math.expm1(e.rate);
}
