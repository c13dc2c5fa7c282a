import { describe, expect, it } from "vitest";
import { SpectrumAnalyzer } from "@leeway/signal";
import {
  MachineSimulator,
  abruptFault,
  bearingOrders,
  collect,
  conceptDrift,
  defineScenario,
  degradationSeverity,
  driftThenDegradation,
  harbourLane,
  recurringModes,
  slowDegradation,
  stationaryNull,
  PS2_DRIVE_END_BEARING,
  type Scenario,
} from "@leeway/sim";
import { expectLeewayError, throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";

function bytesOf(arrays: Float64Array[]): Uint8Array {
  const out = new Uint8Array(arrays.reduce((n, a) => n + a.byteLength, 0));
  let at = 0;
  for (const a of arrays) {
    out.set(new Uint8Array(a.buffer, a.byteOffset, a.byteLength), at);
    at += a.byteLength;
  }
  return out;
}

function frames(scenario: Scenario, count: number): Float64Array[] {
  const sim = new MachineSimulator(scenario);
  const out: Float64Array[] = [];
  for (let i = 0; i < count; i++) out.push(Float64Array.from(sim.frame()?.frame ?? []));
  return out;
}

describe("MachineSimulator", () => {
  it("same seed gives identical bytes of spectra and frames; another seed differs", () => {
    const a = collect(driftThenDegradation({ length: 400, seed: 11 }));
    const b = collect(driftThenDegradation({ length: 400, seed: 11 }));
    const c = collect(driftThenDegradation({ length: 400, seed: 12 }));
    const same = (x: Uint8Array, y: Uint8Array) => Buffer.from(x).equals(Buffer.from(y));
    expect(same(bytesOf(b.spectra), bytesOf(a.spectra))).toBe(true);
    expect(same(bytesOf(c.spectra), bytesOf(a.spectra))).toBe(false);
    expect(b.truth).toEqual(a.truth);
    expect(same(bytesOf(frames(harbourLane({ scale: 2, seed: 5 }), 50)), bytesOf(frames(harbourLane({ scale: 2, seed: 5 }), 50)))).toBe(true);
  });

  it("produces length samples, then null; spectra have the scenario's bins and are finite and ≥ 0", () => {
    const sim = new MachineSimulator(stationaryNull({ length: 120 }));
    expect(sim.length).toBe(120);
    let count = 0;
    for (let s = sim.next(); s !== null; s = sim.next()) {
      expect(s.index).toBe(count);
      expect(s.spectrum.length).toBe(256);
      expect(s.spectrum.every((v) => Number.isFinite(v) && v >= 0)).toBe(true);
      count++;
    }
    expect(count).toBe(120);
    expect(sim.next()).toBeNull();
    expect(sim.frame()).toBeNull();
    for (const bad of [-1, 120, 2.5, Number.NaN]) expectLeewayError(() => sim.truthAt(bad), "E_OPTION", "i", "[0, 119]");
  });

  it("each tonal component appears at its FFT bin with its amplitude (no jitter, lines on exact bins)", () => {
    const df = 5000 / 1024;
    const fr = 5 * df; // shaft rate on bin 5
    const rpm = fr * 60;
    const toneHz = 80 * df; // interference on bin 80
    const scenario = defineScenario({
      length: 2,
      seed: 3,
      machine: { referenceRpm: rpm, jitter: 0, sensorNoise: 1e-4, floorNoise: 1e-4 },
      schedule: [{ start: 0, mode: "test", rpm }],
      events: [{ type: "environment-shift", start: 0, tones: [{ frequency: toneHz, amplitude: 0.2 }] }],
    });
    const sim = new MachineSimulator(scenario);
    const analyzer = new SpectrumAnalyzer({ size: 1024, sampleRate: 5000, window: "hann" });
    const amp = analyzer.amplitude(sim.frame()?.frame ?? new Float64Array(1024));
    // shaft harmonics on bins 5, 10, 15; vane pass (6 vanes) on bins 30, 60; interference on bin 80
    const lines: [number, number][] = [[5, 0.5], [10, 0.25], [15, 0.12], [30, 0.35], [60, 0.12], [80, 0.2]];
    for (const [bin, a] of lines) expect(amp[bin]).toBeCloseTo(a, 3);
    // nothing else above 1 % of the weakest line outside the lines' main lobes
    for (let k = 3; k < amp.length; k++) {
      if (lines.some(([bin]) => Math.abs(k - bin) <= 1)) continue;
      expect(amp[k]).toBeLessThan(1e-3);
    }
  });

  it("a bearing defect puts its lines at h·BPFO·f_r and sidebands ±f_r (nearest bin is a local maximum)", () => {
    const df = 5000 / 1024;
    const rpm = 1485;
    const fr = rpm / 60;
    const scenario = defineScenario({
      length: 100,
      seed: 4,
      machine: { jitter: 0, sensorNoise: 1e-4, floorNoise: 1e-4, harmonics: [], vanePass: [] },
      schedule: [{ start: 0, mode: "mid", rpm }],
      events: [{ type: "degradation", start: 0, growth: "linear", amplitude: 0.4, harmonics: 3, modulation: 0.5 }],
    });
    const sim = new MachineSimulator(scenario);
    let last: Float64Array = new Float64Array(1024);
    for (let f = sim.frame(); f !== null; f = sim.frame()) last = f.frame;
    const amp = new SpectrumAnalyzer({ size: 1024, sampleRate: 5000 }).amplitude(last);
    const bpfo = bearingOrders(PS2_DRIVE_END_BEARING).bpfo * fr;
    for (let h = 1; h <= 3; h++) {
      for (const f of [h * bpfo, h * bpfo - fr, h * bpfo + fr]) {
        const k = Math.round(f / df);
        expect(amp[k]).toBeGreaterThan(amp[k - 2] as number);
        expect(amp[k]).toBeGreaterThan(amp[k + 2] as number);
        expect(amp[k]).toBeGreaterThan(0.01);
      }
    }
    // the fundamental at severity 1: amplitude 0.4 within the Hann scalloping loss (≤ 1.42 dB)
    const k1 = Math.round(bpfo / df);
    expect(Math.max(amp[k1] as number, amp[k1 + 1] as number)).toBeGreaterThan(0.4 * 0.84);
    expect(Math.max(amp[k1] as number, amp[k1 + 1] as number)).toBeLessThan(0.4 * 1.01);
  });

  it("the noise-floor bands read log1p(2σ/√N / a_ref) on average: E[(a_ref·(e^v − 1))²] = 4σ²/N for two-bin bands", () => {
    const scenario = stationaryNull({ length: 200, seed: 9 });
    const { spectra } = collect(scenario);
    const sigma2 = scenario.machine.sensorNoise ** 2 + scenario.machine.floorNoise ** 2;
    let sum = 0;
    let count = 0;
    for (const s of spectra) {
      for (let b = 100; b < 256; b++) {
        sum += (scenario.reference * Math.expm1(s[b] as number)) ** 2;
        count++;
      }
    }
    expect(sum / count / ((4 * sigma2) / 1024)).toBeCloseTo(1, 1);
  });

  it("long frames (65 536 samples) get a noise bank large enough for two non-overlapping segments", () => {
    const sim = new MachineSimulator(defineScenario({ length: 3, frameSize: 65536, bins: 64, schedule: [{ start: 0, mode: "mid", rpm: 1485 }] }));
    for (let s = sim.next(); s !== null; s = sim.next()) expect(s.spectrum.every((v) => Number.isFinite(v) && v > 0)).toBe(true);
  });

  it("ground-truth onsets match the timeline of every suite preset", () => {
    const L = 1200;
    const cases: [Scenario, (i: number, t: { mode: string; environment: number; severity: number; fault: string | null }) => void][] = [
      [stationaryNull({ length: L }), (_i, t) => expect([t.mode, t.environment, t.severity, t.fault]).toEqual(["mid", 0, 0, null])],
      [conceptDrift({ length: L }), (i, t) => expect(t.environment).toBe(i >= 600 ? 1 : 0)],
      [slowDegradation({ length: L }), (i, t) => expect(t.severity > 0).toBe(i >= 240)],
      [
        driftThenDegradation({ length: L }),
        (i, t) => {
          expect(t.environment).toBe(i >= 300 ? 1 : 0);
          expect(t.severity > 0).toBe(i >= 600);
        },
      ],
      [recurringModes({ length: L }), (i, t) => expect(t.mode).toBe(i >= 400 && i < 800 ? "high" : "mid")],
      [abruptFault({ length: L }), (i, t) => expect(t.fault).toBe(i >= 600 && i < 630 ? "clog" : null)],
    ];
    for (const [scenario, check] of cases) {
      const sim = new MachineSimulator(scenario);
      for (let i = 0; i < L; i++) check(i, sim.truthAt(i));
    }
    expect(new MachineSimulator(recurringModes({ length: L })).events.map((e) => [e.type, e.cause, e.start, e.end, e.label])).toEqual([
      ["mode-change", "concept-drift", 400, 800, "high"],
      ["mode-change", "concept-drift", 800, 1200, "mid"],
    ]);
    expect(new MachineSimulator(driftThenDegradation({ length: L })).events.map((e) => [e.type, e.cause, e.start, e.end])).toEqual([
      ["environment-shift", "concept-drift", 300, 1200],
      ["degradation", "degradation", 600, 1200],
    ]);
    expect(new MachineSimulator(abruptFault({ length: L })).events.map((e) => [e.type, e.cause, e.start, e.end])).toEqual([["fault", "anomaly", 600, 630]]);
  });

  it("truth from next() equals truthAt, and the Harbour Lane events sit at round(hour·scale)", () => {
    const scale = 10;
    const sim = new MachineSimulator(harbourLane({ scale }));
    expect(sim.length).toBe(168 * scale);
    const byType = (type: string) => sim.events.filter((e) => e.type === type);
    expect(byType("environment-shift").map((e) => [e.start, e.end, e.cause])).toEqual([[34 * scale, 168 * scale, "concept-drift"]]);
    expect(byType("degradation").map((e) => [e.start, e.end, e.cause])).toEqual([[72 * scale, 168 * scale, "degradation"]]);
    expect(byType("fault").map((e) => [e.start, e.end, e.cause])).toEqual([[134 * scale, 135 * scale, "anomaly"]]);
    const modes = byType("mode-change");
    expect(modes.length).toBe(7 * 4 - 1);
    const expectedMode = (i: number): string => {
      const hour = (i / scale) % 24;
      return hour < 6 ? "low" : hour < 17 ? "mid" : hour < 21 ? "high" : "mid";
    };
    for (let s = sim.next(); s !== null; s = sim.next()) {
      expect(s.truth).toEqual(sim.truthAt(s.index));
      expect(s.truth.mode).toBe(expectedMode(s.index));
    }
    for (let k = 1; k < sim.events.length; k++) expect(sim.events[k]!.start).toBeGreaterThanOrEqual(sim.events[k - 1]!.start);
  });

  it("degradation severity is strictly increasing over the event, in (0, 1], reaching 1 at its last sample", () => {
    for (const growth of ["linear", "exponential"] as const) {
      const e = { start: 100, end: 1100, growth, rate: 4 };
      expect(degradationSeverity(e, 99)).toBe(0);
      expect(degradationSeverity(e, 1100)).toBe(0);
      let previous = 0;
      for (let i = 100; i < 1100; i++) {
        const s = degradationSeverity(e, i);
        expect(s).toBeGreaterThan(previous);
        expect(s).toBeLessThanOrEqual(1);
        previous = s;
      }
      expect(previous).toBeCloseTo(1, 12);
    }
    expect(degradationSeverity({ start: 0, end: 10, growth: "linear", rate: 4 }, 4)).toBe(0.5);
    const sim = new MachineSimulator(slowDegradation({ length: 2000 }));
    let previous = 0;
    for (let i = 400; i < 2000; i++) {
      const s = sim.truthAt(i).severity;
      expect(s).toBeGreaterThan(previous);
      previous = s;
    }
  });

  it("the noise-floor step of conceptDrift is abrupt: the mean spectrum level jumps at the step, and is flat on each side", () => {
    const { spectra } = collect(conceptDrift({ length: 400, seed: 2 }));
    const level = spectra.map((s) => s.reduce((a, b) => a + b, 0) / s.length);
    const mean = (from: number, to: number) => level.slice(from, to).reduce((a, b) => a + b, 0) / (to - from);
    const before = mean(100, 200);
    const after = mean(200, 300);
    expect(after - before).toBeGreaterThan(0.3);
    expect(Math.abs(mean(0, 100) - before)).toBeLessThan(0.02);
    expect(Math.abs(mean(300, 400) - after)).toBeLessThan(0.02);
    expect(Math.min(...level.slice(200, 210))).toBeGreaterThan(Math.max(...level.slice(190, 200)));
  });

  it("slow degradation raises the defect bands gradually: no jump between neighbouring windows, a steady climb overall", () => {
    const L = 6000;
    const { spectra } = collect(slowDegradation({ length: L, seed: 4 }));
    const fr = 1485 / 60;
    const band = (f: number) => Math.floor(f / ((2 * 5000) / 1024));
    const bpfo = bearingOrders(PS2_DRIVE_END_BEARING).bpfo * fr;
    const bands = [band(bpfo), band(2 * bpfo), band(3 * bpfo)];
    const windowMean = (from: number) => {
      let s = 0;
      for (let i = from; i < from + 300; i++) for (const b of bands) s += spectra[i]![b] as number;
      return s / (300 * bands.length);
    };
    const means: number[] = [];
    for (let from = 1200; from + 300 <= L; from += 300) means.push(windowMean(from));
    expect(means[means.length - 1]! - means[0]!).toBeGreaterThan(1.5);
    for (let k = 1; k < means.length; k++) expect(Math.abs(means[k]! - means[k - 1]!)).toBeLessThan(0.5);
  });

  it("a clog raises the vane-pass band while it lasts, and only then", () => {
    const { spectra, truth } = collect(abruptFault({ length: 800, seed: 6 }));
    const vp = Math.floor((6 * 1485) / 60 / ((2 * 5000) / 1024));
    const inside = spectra.filter((_, i) => truth[i]!.fault === "clog").map((s) => s[vp] as number);
    const outside = spectra.filter((_, i) => truth[i]!.fault === null).map((s) => s[vp] as number);
    expect(inside.length).toBe(20);
    expect(Math.min(...inside)).toBeGreaterThan(Math.max(...outside));
  });

  it("looseness raises higher harmonics and impacts raise the kurtosis of the frame", () => {
    const base = { length: 40, seed: 8, schedule: [{ start: 0, mode: "mid", rpm: 1485 }] };
    const df = (2 * 5000) / 1024;
    const loose = collect(defineScenario({ ...base, events: [{ type: "fault", start: 20, end: 40, fault: "looseness", gain: 3 }] }));
    const h5 = Math.floor((5 * 1485) / 60 / df);
    expect(Math.min(...loose.spectra.slice(20).map((s) => s[h5] as number))).toBeGreaterThan(Math.max(...loose.spectra.slice(0, 20).map((s) => s[h5] as number)));
    const sim = new MachineSimulator(defineScenario({ ...base, events: [{ type: "fault", start: 20, end: 40, fault: "impacts", gain: 4 }] }));
    const kurt = (x: Float64Array) => {
      const m = x.reduce((a, b) => a + b, 0) / x.length;
      let m2 = 0;
      let m4 = 0;
      for (const v of x) {
        m2 += (v - m) ** 2;
        m4 += (v - m) ** 4;
      }
      return (m4 / x.length) / (m2 / x.length) ** 2;
    };
    const k: number[] = [];
    for (let f = sim.frame(); f !== null; f = sim.frame()) k.push(kurt(f.frame));
    expect(Math.min(...k.slice(20))).toBeGreaterThan(Math.max(...k.slice(0, 20)));
  });
});

describe("MachineSimulator snapshots", () => {
  it("snapshot/restore through JSON continues with identical bytes and truth, at any point", () => {
    for (const cut of [0, 1, 37, 120]) {
      const a = new MachineSimulator(harbourLane({ scale: 1, seed: 3 }));
      for (let i = 0; i < cut; i++) a.next();
      const b = MachineSimulator.restore(throughJson(a.snapshot()));
      expect(b.index).toBe(cut);
      for (let s = a.next(); s !== null; s = a.next()) {
        const t = b.next();
        expect(t?.truth).toEqual(s.truth);
        expect(Buffer.from((t?.spectrum ?? new Float64Array(0)).buffer).equals(Buffer.from(s.spectrum.buffer))).toBe(true);
      }
      expect(b.next()).toBeNull();
    }
  });

  it("refuses corrupted snapshots whole", () => {
    const sim = new MachineSimulator(
      defineScenario({
        length: 50,
        seed: 2,
        schedule: [
          { start: 0, mode: "mid", rpm: 1485 },
          { start: 20, mode: "high", rpm: 2970 },
        ],
        events: [
          { type: "environment-shift", start: 5, tones: [{ frequency: 30, amplitude: 0.1 }] },
          { type: "fault", start: 10, end: 12, fault: "clog" },
        ],
      }),
    );
    for (let i = 0; i < 7; i++) sim.next();
    expectRefusesCorruptions((s) => MachineSimulator.restore(s), sim.snapshot(), {
      sizePaths: [["index"], ["scenario", "length"]],
      variableLengthPaths: [["scenario", "schedule"], ["scenario", "events"], ["scenario", "machine", "harmonics"], ["scenario", "machine", "vanePass"], ["scenario", "events", 0, "tones"]],
    });
    const other = sim.snapshot();
    other.state.random = new MachineSimulator(stationaryNull({ length: 100, seed: 9 })).snapshot().state.random;
    expectLeewayError(() => MachineSimulator.restore(other), "E_SNAPSHOT", "random", "seed");
  });
});
