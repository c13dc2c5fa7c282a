import { describe, expect, it } from "vitest";
import { LeewayError, RandomSource, typeOf } from "@leeway/core";
import {
  EwMoments,
  Moments,
  P2Quantile,
  QuantileSketch,
  WindowMoments,
  WindowTrend,
  erfc,
  kendallUpperTail,
  kolmogorovSurvival,
  ksTwoSample,
  mannKendall,
  mannKendallHamedRao,
  mannKendallPrewhitened,
  normalCdf,
  normalQuantile,
  normalSurvival,
  senSlopeInterval,
  theilSenSlope,
  timeToLimit,
} from "@leeway/stats";
import {
  Adwin,
  ChangePointPosterior,
  ConformalMartingale,
  Cusum,
  EwmaChart,
  PageHinkley,
  SlidingKsTest,
  batchMeansSpread,
  batchMeansSpreadUpper,
  calibrateThreshold,
  correlatedCusumThreshold,
  cusumArl,
  ewmaArl,
  gaussianThreshold,
} from "@leeway/change";
import { AutoencoderPool, FrozenModel, OselmAutoencoder } from "@leeway/pool";
import {
  BandEnergies,
  Framer,
  RealFft,
  SpectrumAnalyzer,
  crestFactor,
  decimate,
  kurtosis,
  lowPassKernel,
  makeWindow,
  peak,
  reduceBins,
  rms,
  skewness,
  timeFeatures,
  toDecibels,
  velocityRms,
  velocitySpectrum,
} from "@leeway/signal";
import { MachineSimulator, degradationSeverity, shiftFraction, stationaryNull } from "@leeway/sim";

// Every public entry point of core, stats, change, pool, signal and sim that
// takes a number (a sample, an element of a vector or series, or a numeric
// argument) is fed each value below in that place. Each must be refused with a
// LeewayError whose message names the parameter, what is allowed ("must be")
// and the type received; nothing is coerced (common practice, no source).

const NOT_NUMBERS: readonly unknown[] = [null, "5", [7], false, true, {}, undefined, 7n];

/** How an entry point takes the probed value. */
type Place =
  | "scalar" // the value is the argument
  | "optional" // the argument may be omitted: undefined is allowed
  | "vector" // the value is the argument where a vector goes: [7] is a vector (of the wrong length at most), not probed here
  | "element"; // the value is one element of a vector or series

interface EntryPoint {
  /** "Component.method" or "function". */
  name: string;
  /** The parameter as the error message must name it ("x", "x[1]", "option p"). */
  parameter: string;
  place: Place;
  /** Builds a fresh component (if any) and calls the entry point with `bad` in place. */
  call: (bad: unknown) => unknown;
  /** The component's snapshot before and after a refused call must be equal (stateful entry points). */
  state?: () => { run: (bad: unknown) => unknown; snapshot: () => unknown };
}

const B = (x: unknown): never => x as never;
const series = (bad: unknown, n = 12): number[] => {
  const xs: unknown[] = Array.from({ length: n }, (_, i) => Math.sin(i) + 0.1 * i);
  xs[1] = bad;
  return xs as number[];
};
const vector = (bad: unknown, n: number): number[] => series(bad, n);
const rows = (bad: unknown, inputs: number, n = 6): number[][] => {
  const random = new RandomSource(3);
  const out = Array.from({ length: n }, () => Array.from(random.fillNormal(new Float64Array(inputs))));
  (out[2] as unknown[])[1] = bad;
  return out;
};
const goodRows = (inputs: number, n = 20): Float64Array[] => {
  const random = new RandomSource(4);
  return Array.from({ length: n }, () => random.fillNormal(new Float64Array(inputs)));
};

/** One scalar sample `observe(x)` of a sequential component, with its state checked. */
function observeEntry(name: string, make: () => { observe(x: number): unknown; snapshot(): unknown }): EntryPoint {
  return {
    name: `${name}.observe`,
    parameter: "x",
    place: "scalar",
    call: (bad) => make().observe(B(bad)),
    state: () => {
      const c = make();
      c.observe(0.25);
      c.observe(0.5);
      return { run: (bad) => c.observe(B(bad)), snapshot: () => c.snapshot() };
    },
  };
}


const sequential: [string, () => { observe(x: number): unknown; snapshot(): unknown; observeMany?: unknown; scan?: unknown }][] = [
  ["Moments", () => new Moments()],
  ["Moments (skip)", () => new Moments({ nonFinite: "skip" })],
  ["EwMoments", () => new EwMoments({ halfLife: 10 })],
  ["WindowMoments", () => new WindowMoments({ width: 8 })],
  ["WindowTrend", () => new WindowTrend({ width: 8 })],
  ["P2Quantile", () => new P2Quantile({ p: 0.9 })],
  ["QuantileSketch", () => new QuantileSketch({ k: 16, seed: 1 })],
  ["Cusum", () => new Cusum({ mean: 0, sigma: 1 })],
  ["PageHinkley", () => new PageHinkley({ alarmLevel: 5 })],
  ["EwmaChart", () => new EwmaChart({ mean: 0, sigma: 1 })],
  ["Adwin", () => new Adwin()],
  ["SlidingKsTest", () => new SlidingKsTest({ recentSize: 8, referenceSize: 8 })],
  ["ConformalMartingale", () => new ConformalMartingale({ reference: [0.1, 0.2, 0.3, 0.4, 0.5], threshold: 20 })],
  ["ChangePointPosterior", () => new ChangePointPosterior({ scale: "linear", mean: 0, sigma: 1, expectedRunLength: 100 })],
  ["Framer", () => new Framer({ size: 4, hop: 2 }) as never],
  ["Framer (skip)", () => new Framer({ size: 4, hop: 2, nonFinite: "skip" }) as never],
];

/**
 * `observeMany(xs)` / `scan(xs)`: the whole batch replaced. Batches are Float64Arrays (a plain array
 * is refused whole, naming xs and "array"), except the framer's, which also takes a plain array of
 * numbers and then names the element.
 */
function batchEntries(): EntryPoint[] {
  const out: EntryPoint[] = [];
  for (const [name, make] of sequential) {
    const probe = make() as unknown as Record<string, unknown>;
    for (const method of ["observeMany", "scan"] as const) {
      if (typeof probe[method] !== "function") continue;
      const framer = name.startsWith("Framer");
      const invoke = (xs: unknown) => {
        const c = make() as unknown as Record<string, (xs: unknown, more?: unknown) => unknown>;
        return framer ? c[method]!.call(c, xs, () => undefined) : c[method]!.call(c, xs);
      };
      out.push({ name: `${name}.${method}`, parameter: "xs", place: framer ? "vector" : "scalar", call: invoke });
      if (framer) out.push({ name: `${name}.${method} (element)`, parameter: "xs[1]", place: "element", call: (bad) => invoke(series(bad)) });
    }
  }
  return out;
}

function autoencoder(): OselmAutoencoder {
  const model = new OselmAutoencoder({ inputs: 4, hidden: 3, seed: 1 });
  model.fit(goodRows(4));
  return model;
}
function pool(): AutoencoderPool {
  const p = new AutoencoderPool({ inputs: 4, hidden: 3, maxMembers: 2, seed: 1, spawnPatience: 3 });
  for (const row of goodRows(4, 5)) p.learn(row);
  return p;
}
const vectorState = <T extends { snapshot(): unknown }>(make: () => T, run: (c: T, bad: unknown) => unknown) => () => {
  const c = make();
  return { run: (bad: unknown) => run(c, bad), snapshot: () => c.snapshot() };
};

const stats: EntryPoint[] = [
  { name: "Moments.observe (weight)", parameter: "weight", place: "optional", call: (bad) => new Moments().observe(1, B(bad)) },
  { name: "Moments.observeMany (weights)", parameter: "weights", place: "optional", call: (bad) => new Moments().observeMany(Float64Array.from([1, 2]), B(bad)) },
  { name: "Moments.merge", parameter: "other", place: "scalar", call: (bad) => new Moments().merge(B(bad)) },
  { name: "QuantileSketch.rank", parameter: "x", place: "scalar", call: (bad) => new QuantileSketch({ k: 16, seed: 1 }).rank(B(bad)) },
  { name: "QuantileSketch.quantile", parameter: "q", place: "scalar", call: (bad) => new QuantileSketch({ k: 16, seed: 1 }).quantile(B(bad)) },
  { name: "QuantileSketch.rankErrorBound", parameter: "delta", place: "optional", call: (bad) => new QuantileSketch({ k: 16, seed: 1 }).rankErrorBound(B(bad)) },
  { name: "QuantileSketch.merge", parameter: "other", place: "scalar", call: (bad) => new QuantileSketch({ k: 16, seed: 1 }).merge(B(bad)) },
  { name: "mannKendall", parameter: "values[1]", place: "element", call: (bad) => mannKendall(series(bad)) },
  { name: "mannKendall (whole)", parameter: "values", place: "vector", call: (bad) => mannKendall(B(bad)) },
  { name: "theilSenSlope", parameter: "values[1]", place: "element", call: (bad) => theilSenSlope(series(bad)) },
  { name: "mannKendallHamedRao", parameter: "values[1]", place: "element", call: (bad) => mannKendallHamedRao(series(bad)) },
  { name: "mannKendallPrewhitened", parameter: "values[1]", place: "element", call: (bad) => mannKendallPrewhitened(series(bad)) },
  { name: "senSlopeInterval", parameter: "values[1]", place: "element", call: (bad) => senSlopeInterval(series(bad)) },
  { name: "timeToLimit", parameter: "values[1]", place: "element", call: (bad) => timeToLimit(series(bad, 40), { limit: 50, step: 1 }) },
  { name: "ksTwoSample (a)", parameter: "a[1]", place: "element", call: (bad) => ksTwoSample(series(bad), series(0)) },
  { name: "ksTwoSample (b)", parameter: "b[1]", place: "element", call: (bad) => ksTwoSample(series(0), series(bad)) },
  { name: "kolmogorovSurvival", parameter: "lambda", place: "scalar", call: (bad) => kolmogorovSurvival(B(bad)) },
  { name: "erfc", parameter: "x", place: "scalar", call: (bad) => erfc(B(bad)) },
  { name: "normalCdf", parameter: "x", place: "scalar", call: (bad) => normalCdf(B(bad)) },
  { name: "normalSurvival", parameter: "z", place: "scalar", call: (bad) => normalSurvival(B(bad)) },
  { name: "normalQuantile", parameter: "p", place: "scalar", call: (bad) => normalQuantile(B(bad)) },
  { name: "kendallUpperTail", parameter: "n", place: "scalar", call: (bad) => kendallUpperTail(B(bad)) },
];

const change: EntryPoint[] = [
  { name: "Cusum.scan (from)", parameter: "from", place: "optional", call: (bad) => new Cusum({ mean: 0, sigma: 1 }).scan(Float64Array.from([1, 2]), B(bad)) },
  { name: "Adwin.scan (from)", parameter: "from", place: "optional", call: (bad) => new Adwin().scan(Float64Array.from([1, 2]), B(bad)) },
  { name: "cusumArl (k)", parameter: "k", place: "scalar", call: (bad) => cusumArl(B(bad), 5, 0) },
  { name: "cusumArl (h)", parameter: "h", place: "scalar", call: (bad) => cusumArl(0.5, B(bad), 0) },
  { name: "cusumArl (shift)", parameter: "shift", place: "scalar", call: (bad) => cusumArl(0.5, 5, B(bad)) },
  { name: "ewmaArl (lambda)", parameter: "lambda", place: "scalar", call: (bad) => ewmaArl(B(bad), 3, 0) },
  { name: "ewmaArl (shift)", parameter: "shift", place: "scalar", call: (bad) => ewmaArl(0.2, 3, B(bad)) },
  { name: "gaussianThreshold", parameter: "targetArl0", place: "scalar", call: (bad) => gaussianThreshold(B(bad)) },
  { name: "gaussianThreshold (k)", parameter: "k", place: "optional", call: (bad) => gaussianThreshold(500, B(bad)) },
  { name: "batchMeansSpread", parameter: "xs[1]", place: "element", call: (bad) => batchMeansSpread(B(series(bad, 40)), 4) },
  { name: "batchMeansSpread (m)", parameter: "m", place: "scalar", call: (bad) => batchMeansSpread(Float64Array.from(series(0, 40)), B(bad)) },
  { name: "batchMeansSpreadUpper", parameter: "xs[1]", place: "element", call: (bad) => batchMeansSpreadUpper(B(series(bad, 40)), 4) },
  {
    name: "calibrateThreshold",
    parameter: "referenceScores[1]",
    place: "element",
    call: (bad) => calibrateThreshold((h) => new Cusum({ mean: 0, sigma: 1, h }), series(bad, 40), { targetArl0: 50, seed: 1, replicates: 10 }),
  },
  {
    name: "correlatedCusumThreshold",
    parameter: "normalScores[1]",
    place: "element",
    call: (bad) => correlatedCusumThreshold((h) => new Cusum({ mean: 0, sigma: 1, h }), B(series(bad, 200)), { targetArl0: 50, replicates: 10, seed: 1, k: 0.5 }),
  },
];

const poolEntries: EntryPoint[] = [];
for (const [name, make] of [
  ["OselmAutoencoder", autoencoder],
  ["FrozenModel", () => FrozenModel.from(autoencoder())],
  ["AutoencoderPool", pool],
] as const) {
  for (const method of ["score", "learn", "reconstruct"] as const) {
    const probe = make() as unknown as Record<string, unknown>;
    if (typeof probe[method] !== "function") continue;
    const invoke = (c: unknown, x: unknown) => (c as Record<string, (x: unknown) => unknown>)[method]!(x);
    poolEntries.push(
      { name: `${name}.${method}`, parameter: "x[1]", place: "element", call: (bad) => invoke(make(), vector(bad, 4)), state: vectorState(make as () => OselmAutoencoder, (c, bad) => invoke(c, vector(bad, 4))) },
      { name: `${name}.${method} (whole)`, parameter: "x", place: "vector", call: (bad) => invoke(make(), bad) },
    );
  }
}
poolEntries.push(
  { name: "OselmAutoencoder.fit", parameter: "rows[2][1]", place: "element", call: (bad) => new OselmAutoencoder({ inputs: 4, hidden: 3, seed: 1 }).fit(rows(bad, 4)) },
  { name: "OselmAutoencoder.learnChunk", parameter: "rows[2][1]", place: "element", call: (bad) => autoencoder().learnChunk(rows(bad, 4)), state: vectorState(autoencoder, (c, bad) => c.learnChunk(rows(bad, 4))) },
  { name: "AutoencoderPool.learn (member)", parameter: "member", place: "optional", call: (bad) => pool().learn(goodRows(4, 1)[0]!, B(bad)) },
  { name: "AutoencoderPool.addMember", parameter: "source[2][1]", place: "element", call: (bad) => pool().addMember(rows(bad, 4)) },
  { name: "AutoencoderPool.replaceMember", parameter: "source[2][1]", place: "element", call: (bad) => pool().replaceMember(0, rows(bad, 4)) },
  { name: "AutoencoderPool.replaceMember (member)", parameter: "member", place: "scalar", call: (bad) => pool().replaceMember(B(bad), goodRows(4)) },
  { name: "AutoencoderPool.freeze", parameter: "member", place: "scalar", call: (bad) => pool().freeze(B(bad)) },
  { name: "AutoencoderPool.memberModel", parameter: "member", place: "scalar", call: (bad) => pool().memberModel(B(bad)) },
  { name: "AutoencoderPool.setLabel", parameter: "member", place: "scalar", call: (bad) => pool().setLabel(B(bad), "low") },
);

const FRAME = 16;
const analyzer = () => new SpectrumAnalyzer({ size: FRAME, sampleRate: 160 });
const signal: EntryPoint[] = [
  { name: "RealFft.forward", parameter: "data", place: "scalar", call: (bad) => new RealFft(FRAME).forward(B(bad)) },
  { name: "RealFft.inverse", parameter: "data", place: "scalar", call: (bad) => new RealFft(FRAME).inverse(B(bad)) },
  { name: "SpectrumAnalyzer.frequency", parameter: "k", place: "scalar", call: (bad) => analyzer().frequency(B(bad)) },
  ...(["transform", "amplitude", "power", "density"] as const).flatMap((m): EntryPoint[] => [
    { name: `SpectrumAnalyzer.${m}`, parameter: "frame[1]", place: "element", call: (bad) => analyzer()[m](B(vector(bad, FRAME))) },
    { name: `SpectrumAnalyzer.${m} (whole)`, parameter: "frame", place: "vector", call: (bad) => analyzer()[m](B(bad)) },
  ]),
  {
    name: "BandEnergies.compute",
    parameter: "power[1]",
    place: "element",
    call: (bad) => new BandEnergies({ edges: [10, 30, 60], size: FRAME, sampleRate: 160 }).compute(B(vector(bad, FRAME / 2 + 1))),
  },
  { name: "reduceBins", parameter: "values[1]", place: "element", call: (bad) => reduceBins(B(vector(bad, 8)), 2) },
  { name: "reduceBins (bins)", parameter: "bins", place: "scalar", call: (bad) => reduceBins(Float64Array.from(vector(0, 8)), B(bad)) },
  { name: "toDecibels", parameter: "values[1]", place: "element", call: (bad) => toDecibels(B(vector(bad, 8))) },
  ...([
    ["timeFeatures", timeFeatures],
    ["rms", rms],
    ["peak", peak],
    ["crestFactor", crestFactor],
    ["skewness", skewness],
    ["kurtosis", kurtosis],
  ] as const).flatMap(([name, f]): EntryPoint[] => [
    { name, parameter: "frame[1]", place: "element", call: (bad) => f(B(vector(bad, FRAME))) },
    { name: `${name} (whole)`, parameter: "frame", place: "vector", call: (bad) => f(B(bad)) },
  ]),
  { name: "velocitySpectrum", parameter: "acceleration[1]", place: "element", call: (bad) => velocitySpectrum(B(vector(bad, 9)), 5, 10) },
  { name: "velocitySpectrum (binWidth)", parameter: "binWidth", place: "scalar", call: (bad) => velocitySpectrum(new Float64Array(9), B(bad), 10) },
  { name: "velocitySpectrum (lowCut)", parameter: "lowCut", place: "scalar", call: (bad) => velocitySpectrum(new Float64Array(9), 5, B(bad)) },
  { name: "velocityRms", parameter: "power[1]", place: "element", call: (bad) => velocityRms(B(vector(bad, 9)), 5, 10) },
  { name: "velocityRms (binWidth)", parameter: "binWidth", place: "scalar", call: (bad) => velocityRms(new Float64Array(9), B(bad), 10) },
  { name: "decimate", parameter: "signal[1]", place: "element", call: (bad) => decimate(vector(bad, 64), 2) },
  { name: "decimate (factor)", parameter: "factor", place: "scalar", call: (bad) => decimate(new Float64Array(64), B(bad)) },
  { name: "lowPassKernel (cutoff)", parameter: "cutoff", place: "scalar", call: (bad) => lowPassKernel(B(bad), 11) },
  { name: "lowPassKernel (taps)", parameter: "taps", place: "scalar", call: (bad) => lowPassKernel(0.1, B(bad)) },
  { name: "makeWindow (size)", parameter: "size", place: "scalar", call: (bad) => makeWindow("hann", B(bad)) },
];

const core: EntryPoint[] = [
  { name: "RandomSource.uniform (low)", parameter: "low", place: "scalar", call: (bad) => new RandomSource(1).uniform(B(bad), 1) },
  { name: "RandomSource.uniform (high)", parameter: "high", place: "scalar", call: (bad) => new RandomSource(1).uniform(0, B(bad)) },
  { name: "RandomSource.integer", parameter: "n", place: "scalar", call: (bad) => new RandomSource(1).integer(B(bad)) },
  { name: "RandomSource.normal (mean)", parameter: "mean", place: "optional", call: (bad) => new RandomSource(1).normal(B(bad)) },
  { name: "RandomSource.normal (sd)", parameter: "sd", place: "optional", call: (bad) => new RandomSource(1).normal(0, B(bad)) },
  { name: "RandomSource.exponential", parameter: "rate", place: "optional", call: (bad) => new RandomSource(1).exponential(B(bad)) },
  { name: "RandomSource.fillNormal (mean)", parameter: "mean", place: "optional", call: (bad) => new RandomSource(1).fillNormal(new Float64Array(2), B(bad)) },
  { name: "RandomSource.fillNormal (sd)", parameter: "sd", place: "optional", call: (bad) => new RandomSource(1).fillNormal(new Float64Array(2), 0, B(bad)) },
];

const sim: EntryPoint[] = [
  { name: "MachineSimulator.truthAt", parameter: "i", place: "scalar", call: (bad) => new MachineSimulator(stationaryNull({ length: 100, seed: 1 })).truthAt(B(bad)) },
  { name: "degradationSeverity", parameter: "i", place: "scalar", call: (bad) => degradationSeverity({ start: 0, end: 10, growth: "linear", rate: 4 }, B(bad)) },
  { name: "shiftFraction", parameter: "i", place: "scalar", call: (bad) => shiftFraction({ start: 0, end: 10, ramp: 4 }, B(bad)) },
];

/** One numeric option of every constructor and option-taking function (E_OPTION, naming "option <name>"). */
const options: EntryPoint[] = ([
  ["EwMoments", "halfLife", "scalar", (v) => new EwMoments({ halfLife: v })],
  ["WindowMoments", "width", "scalar", (v) => new WindowMoments({ width: v })],
  ["WindowTrend", "width", "scalar", (v) => new WindowTrend({ width: v })],
  ["P2Quantile", "p", "scalar", (v) => new P2Quantile({ p: v })],
  ["QuantileSketch", "k", "optional", (v) => new QuantileSketch({ k: v, seed: 1 })],
  ["Cusum", "h", "optional", (v) => new Cusum({ mean: 0, sigma: 1, h: v })],
  ["Cusum", "mean", "optional", (v) => new Cusum({ mean: v, sigma: 1 })],
  ["PageHinkley", "alarmLevel", "scalar", (v) => new PageHinkley({ alarmLevel: v })],
  ["EwmaChart", "lambda", "optional", (v) => new EwmaChart({ mean: 0, sigma: 1, lambda: v })],
  ["Adwin", "delta", "optional", (v) => new Adwin({ delta: v })],
  ["SlidingKsTest", "recentSize", "optional", (v) => new SlidingKsTest({ recentSize: v, referenceSize: 8 })],
  ["ConformalMartingale", "threshold", "optional", (v) => new ConformalMartingale({ reference: [0.1, 0.2, 0.3], threshold: v })],
  ["ConformalMartingale", "reference[1]", "element", (v) => new ConformalMartingale({ reference: series(v, 4), threshold: 20 })],
  ["ChangePointPosterior", "expectedRunLength", "optional", (v) => new ChangePointPosterior({ scale: "linear", mean: 0, sigma: 1, expectedRunLength: v })],
  ["SlidingKsTest", "referenceSample[1]", "element", (v) => new SlidingKsTest({ recentSize: 8, referenceSample: series(v, 8) })],
  ["calibrateThreshold", "targetArl0", "scalar", (v) => calibrateThreshold((h) => new Cusum({ mean: 0, sigma: 1, h }), series(0, 40), { targetArl0: v, seed: 1 })],
  ["timeToLimit", "limit", "scalar", (v) => timeToLimit(series(0, 40), { limit: v, step: 1 })],
  ["senSlopeInterval", "confidence", "optional", (v) => senSlopeInterval(series(0), { confidence: v })],
  ["OselmAutoencoder", "hidden", "scalar", (v) => new OselmAutoencoder({ inputs: 4, hidden: v, seed: 1 })],
  ["OselmAutoencoder", "forgetting", "optional", (v) => new OselmAutoencoder({ inputs: 4, hidden: 3, seed: 1, forgetting: v })],
  ["AutoencoderPool", "maxMembers", "optional", (v) => new AutoencoderPool({ inputs: 4, hidden: 3, seed: 1, maxMembers: v })],
  ["Framer", "size", "scalar", (v) => new Framer({ size: v })],
  ["SpectrumAnalyzer", "sampleRate", "scalar", (v) => new SpectrumAnalyzer({ size: FRAME, sampleRate: v })],
  ["BandEnergies", "edges[1]", "element", (v) => new BandEnergies({ edges: [10, v, 60], size: FRAME, sampleRate: 160 })],
  ["toDecibels", "reference", "optional", (v) => toDecibels(new Float64Array(4), { reference: v })],
  ["stationaryNull", "length", "optional", (v) => stationaryNull({ length: v, seed: 1 })],
  ["MachineSimulator", "length", "scalar", (v) => new MachineSimulator({ ...stationaryNull({ length: 100, seed: 1 }), length: v })],
] as [string, string, Place, (v: never) => unknown][]).map(([name, option, place, make]) => ({
  name: `${name} (option ${option})`,
  parameter: option,
  place,
  call: (bad: unknown) => make(B(bad)),
}));

const ENTRY_POINTS: EntryPoint[] = [...options, ...sequential.map(([name, make]) => observeEntry(name, make)), ...batchEntries(), ...stats, ...change, ...poolEntries, ...signal, ...core, ...sim];

/** The values an entry point must refuse in its place. */
function refusedValues(place: Place): unknown[] {
  return NOT_NUMBERS.filter((v) => !(place === "optional" && v === undefined) && !(place === "vector" && Array.isArray(v)));
}

function thrown(run: () => unknown): unknown {
  try {
    run();
  } catch (error) {
    return error;
  }
  return undefined;
}

describe("every entry point refuses non-numbers, naming the parameter, the type received and what is allowed", () => {
  it.each(ENTRY_POINTS.map((e) => [e.name, e] as const))("%s", (_, entry) => {
    const problems: string[] = [];
    for (const bad of refusedValues(entry.place)) {
      const error = thrown(() => entry.call(bad));
      const shown = `${entry.name}(${typeOf(bad)} ${String(bad)})`;
      if (!(error instanceof LeewayError)) {
        problems.push(`${shown}: ${error === undefined ? "accepted" : `threw ${String(error)}`}`);
        continue;
      }
      const m = error.message;
      if (!m.includes(`${entry.parameter} must be`)) problems.push(`${shown}: message does not name "${entry.parameter} must be": ${m}`);
      if (!m.includes(`(${typeOf(bad)})`)) problems.push(`${shown}: message does not name the type ${typeOf(bad)}: ${m}`);
    }
    expect(problems).toEqual([]);
  });

  it.each(ENTRY_POINTS.filter((e) => e.state !== undefined).map((e) => [e.name, e] as const))("%s leaves the state unchanged when it refuses", (_, entry) => {
    const { run, snapshot } = entry.state!();
    const before = JSON.stringify(snapshot());
    for (const bad of refusedValues(entry.place)) {
      expect(thrown(() => run(bad))).toBeInstanceOf(LeewayError);
      expect(JSON.stringify(snapshot())).toBe(before);
    }
  });
});
