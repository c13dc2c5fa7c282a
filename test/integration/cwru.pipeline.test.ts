// Real-data check of the spectrum → autoencoder → score pipeline on rolling-bearing
// vibration from the Case Western Reserve University Bearing Data Center (drive-end
// accelerometer; 0.021-inch seeded faults on the drive-end bearing; see
// ../shared/data/README.md). Normal baseline at 0 HP recorded at 48 kHz and decimated
// to 12 kHz here; fault records at 0–3 HP recorded at 12 kHz.
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { describe, expect } from "vitest";
import { withDataset } from "../support/real-data.js";
import { mannWhitney, prAuc, replay, type Pipeline } from "@leeway/eval";
import type { Decision } from "@leeway/policy";
import { DecisionEngine } from "@leeway/policy";
import { AutoencoderPool } from "@leeway/pool";
import { Framer, SpectrumAnalyzer, decimate, reduceBins } from "@leeway/signal";

const dataDir = fileURLToPath(new URL("../../../shared/data/cwru-bearing/", import.meta.url));
const dataIt = withDataset("cwru-bearing (Case Western Reserve University Bearing Data Center)", `${dataDir}1797_Normal_DE.csv`);

const FRAME = 1024; // samples per frame at 12 kHz (85 ms)
const HOP = 256;
// Only 0–4.5 kHz is used: the decimation filter of the normal record rolls off above 4.8 kHz,
// while the fault records (acquired at 12 kHz) keep content up to 6 kHz; bins up there would
// tell the recording chains apart, not the bearings.
const USED_BINS = 384; // one-sided bins 0–383 of 1024 at 12 kHz (Δf = 11.7 Hz): 0–4.5 kHz
const BINS = 128; // averaged 3 to 1: 35.2 Hz per input
const LOADS = [
  { rpm: 1797, hp: 0 },
  { rpm: 1772, hp: 1 },
  { rpm: 1750, hp: 2 },
  { rpm: 1730, hp: 3 },
];
const FAULTS = [
  { code: "IR", name: "inner race" },
  { code: "ORat6", name: "outer race" },
  { code: "B", name: "ball" },
];

function readColumn(file: string): Float64Array {
  const lines = readFileSync(`${dataDir}${file}`, "utf8").trim().split("\n");
  if (lines[0]?.trim() !== "DE") throw new Error(`${file}: expected the header DE, got ${lines[0]}`);
  return Float64Array.from(lines.slice(1), (line) => Number(line));
}

// frames → Hann-windowed amplitude spectra (g) → 0–4.5 kHz in 128 averaged bins → log10, in framer order
function spectra(signal: Float64Array, hop = HOP): Float64Array[] {
  const framer = new Framer({ size: FRAME, hop });
  const analyzer = new SpectrumAnalyzer({ size: FRAME, sampleRate: 12_000, window: "hann" });
  const amplitude = new Float64Array(analyzer.bins);
  const out: Float64Array[] = [];
  for (const x of signal) {
    const frame = framer.observe(x);
    if (frame === null) continue;
    analyzer.amplitude(frame, amplitude);
    const row = reduceBins(amplitude.subarray(0, USED_BINS), BINS);
    for (let b = 0; b < BINS; b++) row[b] = Math.log10((row[b] as number) + 1e-6);
    out.push(row);
  }
  return out;
}

// The scoring pipeline for replay: every sample is scored (held, never learnt) by the commissioned pool.
function scoring(pool: AutoencoderPool): Pipeline<Float64Array> {
  let index = 0;
  return {
    observe(x: Float64Array): Decision {
      const loss = pool.score(x).loss;
      return { index: index++, action: "hold", cause: "normal", phase: "watching", evidence: { liveScore: loss, referenceScores: [loss] } };
    },
  };
}

describe(`CWRU bearing data: spectra scored by an autoencoder commissioned on the normal record`, () => {
  dataIt("inner- and outer-race fault frames score above held-out normal frames at every load (ROC AUC ≥ 0.99); ball faults measured", () => {
    // 48 kHz → 12 kHz: anti-alias low-pass (257-tap windowed sinc, cut-off 5.4 kHz), every 4th sample.
    const normal = decimate(readColumn("1797_Normal_DE.csv"), 4);
    expect(normal.length).toBe(24_000);
    // Commission on frames of the first second; hold out frames that lie wholly in the second.
    const commissioning = spectra(normal.subarray(0, 12_000));
    const heldOut = spectra(normal.subarray(12_000));
    const pool = new AutoencoderPool({ inputs: BINS, hidden: 8, maxMembers: 1, seed: "cwru", scaling: "standardize" });
    pool.addMember(commissioning, "normal, 0 HP");

    // For the record: the commissioning frames' own (in-sample) scores.
    const inSampleMax = Math.max(...commissioning.map((x) => pool.score(x).loss));

    const rows: string[] = [];
    for (const fault of FAULTS) {
      for (const load of LOADS) {
        const faulty = spectra(readColumn(`${load.rpm}_${fault.code}_21_DE12_DE.csv`));
        const stream = [...heldOut, ...faulty];
        const anomaly = stream.map((_, i) => i >= heldOut.length);
        const { metrics, timeline } = replay(scoring(pool), stream, { events: [], anomaly }, { keepDecisions: false });
        const direct = mannWhitney(timeline.liveScores(), anomaly);
        expect(metrics.scores?.live?.rocAuc).toBe(direct.auc);
        const normalMax = Math.max(...timeline.liveScores().subarray(0, heldOut.length));
        const faultMin = Math.min(...timeline.liveScores().subarray(heldOut.length));
        rows.push(`| ${fault.name} | ${load.hp} HP (${load.rpm} rpm) | ${faulty.length} | ${direct.auc.toFixed(4)} | ${prAuc(timeline.liveScores(), anomaly).toFixed(4)} | ${normalMax.toFixed(3)} | ${faultMin.toFixed(3)} |`);
        if (fault.code !== "B") expect(direct.auc, `${fault.name} at ${load.hp} HP`).toBeGreaterThanOrEqual(0.99);
      }
    }
    console.log(
      [`CWRU: ${commissioning.length} commissioning frames (in-sample scores ≤ ${inSampleMax.toFixed(3)}) and ${heldOut.length} held-out normal frames (0 HP)`, "| fault | load | fault frames | ROC AUC | PR AUC | max normal score | min fault score |", "|---|---|---:|---:|---:|---:|---:|", ...rows].join("\n"),
    );
  });

  dataIt("the decision engine, commissioned on the normal frames, answers every fault record with an anomaly alarm and learns none of it (docs/cwru-example.md)", () => {
    // As in docs/cwru-example.md: frames 128 samples apart; 180 normal frames, then 180 of one fault record.
    const normal = spectra(decimate(readColumn("1797_Normal_DE.csv"), 4), 128);
    const outcomes: string[] = [];
    for (const fault of FAULTS) {
      for (const load of LOADS) {
        const faulty = spectra(readColumn(`${load.rpm}_${fault.code}_21_DE12_DE.csv`), 128);
        const engine = new DecisionEngine({ inputs: BINS, commissioning: 100, calibration: 60, hidden: 8 });
        const event = { cause: "anomaly" as const, start: normal.length, end: normal.length + faulty.length };
        const { metrics } = replay(engine, [...normal, ...faulty], { events: [event] }, { keepDecisions: false });
        const answer = metrics.perEvent[0];
        const where = `${fault.name} at ${load.hp} HP`;
        expect(answer?.claimed, where).toBe("anomaly");
        // anomalyRun (5 by default) consecutive anomalous frames raise the alarm
        expect(answer?.delay, where).toBeLessThanOrEqual(10);
        expect(metrics.falseAlarms, where).toBe(0);
        expect(metrics.retrains.count, where).toBe(0);
        expect(metrics.learnedDuring.anomaly, where).toBe(0);
        outcomes.push(`${fault.name} ${load.hp} HP: alarm (${answer?.claimed}) after ${answer?.delay} frames`);
      }
    }
    console.log(`CWRU through the decision engine: ${outcomes.join("; ")}`);
  });
});
