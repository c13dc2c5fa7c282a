import FFT from "fft.js";
import { it } from "vitest";
import { RandomSource } from "@leeway/core";
import { BandEnergies, Framer, RealFft, SpectrumAnalyzer, reduceBins, timeFeatures } from "@leeway/signal";
import { BenchReport, consume, nsPerOp, sumBaselineNs } from "./harness.js";

it("signal: FFT, spectra, features", () => {
  const report = new BenchReport("signal");
  const baseline = sumBaselineNs(new RandomSource(1).fillUniform(new Float64Array(1 << 16)));
  const n = 1024;
  const frame = new RandomSource(2).fillNormal(new Float64Array(n));
  const frames = 64;

  // 1024-point real FFT: ours in place (copy included), fft.js 4.0.4 realTransform (out of place, half spectrum)
  const fft = new RealFft(n);
  const work = new Float64Array(n);
  const oursNs = nsPerOp(() => {
    for (let f = 0; f < frames; f++) {
      work.set(frame);
      fft.forward(work);
    }
    consume(work[3] as number);
  }, frames);
  const reference = new FFT(n);
  const out = reference.createComplexArray() as number[];
  const input = Array.from(frame);
  const fftJsNs = nsPerOp(() => {
    for (let f = 0; f < frames; f++) reference.realTransform(out, input);
    consume(out[3] as number);
  }, frames);
  report.add("RealFft.forward, 1024 points, per frame", oursNs, baseline, `${(1e9 / oursNs).toFixed(0)} frames/s`);
  report.add("fft.js 4.0.4 realTransform, 1024 points, per frame", fftJsNs, baseline, `${(1e9 / fftJsNs).toFixed(0)} frames/s`);
  report.add("RealFft.forward relative to fft.js realTransform (ratio = ours / fft.js)", oursNs, fftJsNs, "target <= 1.0");

  // frame → 256-bin spectrum: Hann window, power spectrum, first 512 bins summed in pairs, log1p(√E / a_ref)
  const analyzer = new SpectrumAnalyzer({ size: n, sampleRate: 5000 });
  const power = new Float64Array(analyzer.bins);
  const below = power.subarray(0, n / 2);
  const bands = new Float64Array(256);
  const spectrumNs = nsPerOp(() => {
    for (let f = 0; f < frames; f++) {
      analyzer.power(frame, power);
      reduceBins(below, 256, bands, "sum");
      for (let b = 0; b < 256; b++) bands[b] = Math.log1p(Math.sqrt(bands[b] as number) * 1000);
    }
    consume(bands[5] as number);
  }, frames);
  report.add("frame (1024) -> 256-bin log spectrum, per frame", spectrumNs, baseline, `${(1e9 / spectrumNs).toFixed(0)} frames/s`);
  const amplitude = new Float64Array(analyzer.bins);
  report.add("SpectrumAnalyzer.amplitude, 1024 points, per frame", nsPerOp(() => {
    for (let f = 0; f < frames; f++) analyzer.amplitude(frame, amplitude);
    consume(amplitude[5] as number);
  }, frames), baseline);

  const bandEnergies = new BandEnergies({ edges: [10, 100, 300, 1000, 2500], size: n, sampleRate: 5000 });
  const energies = new Float64Array(4);
  report.add("BandEnergies.compute, 4 bands of 513 bins, per frame", nsPerOp(() => {
    for (let f = 0; f < frames; f++) bandEnergies.compute(power, energies);
    consume(energies[1] as number);
  }, frames), baseline);
  report.add("timeFeatures, 1024 samples, per sample", nsPerOp(() => {
    let s = 0;
    for (let f = 0; f < frames; f++) s += timeFeatures(frame).kurtosis;
    consume(s);
  }, frames * n), baseline);

  const stream = new RandomSource(3).fillNormal(new Float64Array(1 << 15));
  const framer = new Framer({ size: n, hop: n / 2 });
  report.add("Framer.observeMany, size 1024, hop 512, per sample", nsPerOp(() => {
    let s = 0;
    framer.observeMany(stream, (fr) => (s += fr[0] as number));
    consume(s);
  }, stream.length), baseline);
  report.write();
});
