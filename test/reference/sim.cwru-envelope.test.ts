// Real-data check of the bearing defect formulas and the FFT on rolling-bearing
// vibration from the Case Western Reserve University Bearing Data Center
// (drive-end accelerometer at 12 kHz, 0.021-inch seeded faults on the drive-end
// bearing, a 6205-size bearing; see ../shared/data/README.md): the envelope
// spectrum of each outer- and inner-race fault record peaks at BPFO·f_r and
// BPFI·f_r computed from the bearing's geometry.
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { describe, expect } from "vitest";
import { withDataset } from "../support/real-data.js";
import { RealFft } from "@leeway/signal";
import { bearingOrders } from "@leeway/sim";

const dataDir = fileURLToPath(new URL("../../../shared/data/cwru-bearing/", import.meta.url));
const dataIt = withDataset("cwru-bearing (Case Western Reserve University Bearing Data Center)", `${dataDir}1797_ORat6_21_DE12_DE.csv`);

const FS = 12_000; // Hz
const N = 16_384; // 1.37 s, Δf = 0.73 Hz

function readColumn(file: string): Float64Array {
  const lines = readFileSync(`${dataDir}${file}`, "utf8").trim().split("\n");
  if (lines[0]?.trim() !== "DE") throw new Error(`${file}: expected the header DE, got ${lines[0]}`);
  return Float64Array.from(lines.slice(1, N + 1), (line) => Number(line));
}

/**
 * Squared-envelope spectrum (band-pass 2–5 kHz by zeroing FFT bins, square,
 * FFT; common practice in bearing diagnostics, e.g. Randall & Antoni 2011):
 * the frequency of its largest line in [50, 250] Hz.
 */
function envelopePeakHz(x: Float64Array): number {
  const fft = new RealFft(N);
  const mean = x.reduce((a, b) => a + b, 0) / N;
  const work = Float64Array.from(x, (v) => v - mean);
  fft.forward(work);
  const df = FS / N;
  work[0] = 0;
  work[1] = 0;
  for (let k = 1; k < N / 2; k++) {
    if (k * df < 2000 || k * df > 5000) {
      work[2 * k] = 0;
      work[2 * k + 1] = 0;
    }
  }
  fft.inverse(work);
  let energy = 0;
  for (let i = 0; i < N; i++) {
    work[i] = (work[i] as number) ** 2;
    energy += work[i] as number;
  }
  for (let i = 0; i < N; i++) work[i] = (work[i] as number) - energy / N;
  fft.forward(work);
  let best = 0;
  let bestHz = 0;
  for (let k = Math.ceil(50 / df); k * df <= 250; k++) {
    const a = Math.hypot(work[2 * k] as number, work[2 * k + 1] as number);
    if (a > best) {
      best = a;
      bestHz = k * df;
    }
  }
  return bestHz;
}

describe(`CWRU bearing data: envelope lines at the kinematic defect frequencies`, () => {
  const orders = bearingOrders({ balls: 9, ballDiameter: 7.94, pitchDiameter: 39.04, contactAngle: 0 });
  for (const rpm of [1797, 1772, 1750, 1730]) {
    dataIt(`${rpm} rpm: outer-race record peaks at BPFO·f_r, inner-race record at BPFI·f_r, within 1 % (CWRU Bearing Data Center records, drive end, 12 kHz)`, () => {
      const fr = rpm / 60;
      const outer = envelopePeakHz(readColumn(`${rpm}_ORat6_21_DE12_DE.csv`));
      const inner = envelopePeakHz(readColumn(`${rpm}_IR_21_DE12_DE.csv`));
      expect(Math.abs(outer / (orders.bpfo * fr) - 1)).toBeLessThan(0.01);
      expect(Math.abs(inner / (orders.bpfi * fr) - 1)).toBeLessThan(0.01);
    });
  }
});
