import { it } from "vitest";
import { Matrix } from "ml-matrix";
import { RandomSource } from "@leeway/core";
import { AutoencoderPool, OselmAutoencoder, type Dtype } from "@leeway/pool";
import { BenchReport, consume, nsPerOp, sumBaselineNs } from "./harness.js";

const n = 256;
const L = 32;
// multiply-adds per call, counted from the loops
const SCORE_MA = 2 * L * n; // W·z and βᵀh
const UPDATE_MA = L * n + L * L + (L * (L + 1)) / 2; // β += k eᵀ, u = P h, upper triangle of P
const LEARN_MA = SCORE_MA + UPDATE_MA;

/** Log-magnitude-like rows: a few shared shapes plus noise (invented). */
function rows(count: number, seed: number): Float64Array[] {
  const random = new RandomSource(seed);
  const shapes = [0, 1, 2].map(() => Float64Array.from({ length: n }, (_, j) => 1 + Math.sin((j * (random.next() + 0.5)) / 9)));
  return Array.from({ length: count }, () => {
    const s = shapes[random.integer(3)] as Float64Array;
    return Float64Array.from(s, (v) => v + 0.05 * random.normal());
  });
}

function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += (a[i] as number) * (b[i] as number);
  return s;
}

/** The same OS-ELM autoencoder written with ml-matrix operations (the reference of ratio a). */
class MatrixAutoencoder {
  readonly w: Matrix;
  readonly b: Matrix;
  beta: Matrix;
  p: Matrix;
  constructor(model: OselmAutoencoder) {
    const { weights, biases } = model.hiddenLayer();
    this.w = new Matrix(L, n);
    for (let i = 0; i < L; i++) for (let j = 0; j < n; j++) this.w.set(i, j, weights[i * n + j] as number);
    this.b = Matrix.columnVector(Array.from(biases));
    const beta = model.outputWeights();
    const p = model.inverseGram();
    this.beta = new Matrix(L, n);
    for (let i = 0; i < L; i++) for (let j = 0; j < n; j++) this.beta.set(i, j, beta[i * n + j] as number);
    this.p = new Matrix(L, L);
    for (let i = 0; i < L; i++) for (let j = 0; j < L; j++) this.p.set(i, j, p[i * L + j] as number);
  }
  #forward(x: Float64Array): { z: Matrix; h: Matrix; e: Matrix } {
    const z = Matrix.columnVector(Array.from(x));
    const h = this.w.mmul(z).add(this.b);
    h.apply((i, j) => h.set(i, j, 1 / (1 + Math.exp(-h.get(i, j)))));
    const e = Matrix.sub(z, this.beta.transpose().mmul(h));
    return { z, h, e };
  }
  score(x: Float64Array): number {
    const { e } = this.#forward(x);
    return e.norm("frobenius") ** 2 / n;
  }
  learn(x: Float64Array): void {
    const { h, e } = this.#forward(x);
    const u = this.p.mmul(h);
    const c = h.transpose().mmul(u).get(0, 0);
    const k = Matrix.div(u, 1 + c);
    this.beta.add(k.mmul(e.transpose()));
    this.p.sub(u.mmul(k.transpose()));
  }
}

function median(xs: number[]): number {
  const sorted = xs.slice().sort((a, b) => a - b);
  return sorted[Math.floor(sorted.length / 2)] as number;
}

/**
 * Times several runs in alternation, `rounds` times, so that a change of the
 * machine's load hits all of them alike. Returns the ns per operation of each
 * run in each round.
 */
function interleaved(runs: (() => number)[], rounds = 9): number[][] {
  const times = runs.map(() => [] as number[]);
  for (let r = 0; r < rounds; r++) runs.forEach((run, i) => (times[i] as number[]).push(run()));
  return times;
}

/** Median over rounds of a[r] / b[r]. */
function ratioOf(a: number[], b: number[]): number {
  return median(a.map((x, r) => x / (b[r] as number)));
}

it("pool: OS-ELM autoencoder 256-32-256 and a pool of 4", () => {
  const data = rows(4096, 1);
  const baseline = sumBaselineNs(data[0] as Float64Array);
  const report = new BenchReport("pool");
  const quick = { minMs: 40, repeats: 3 };
  // The machine's scalar multiply-add rate: a tight dot product of two Float64Arrays
  // of L·n elements (the size of W and of β), timed in alternation with the kernels.
  const da = new RandomSource(2).fillUniform(new Float64Array(L * n));
  const db = new RandomSource(3).fillUniform(new Float64Array(L * n));
  const dotRun = (): number => nsPerOp(() => consume(dot(da, db)), L * n, quick);

  const fitted = (dtype: Dtype): OselmAutoencoder => {
    const model = new OselmAutoencoder({ inputs: n, hidden: L, seed: 4, dtype });
    model.fit(data.slice(0, 64));
    return model;
  };
  let t = 0;
  const scoreRun = (model: OselmAutoencoder) => (): number =>
    nsPerOp(() => {
      let s = 0;
      for (let i = 0; i < 64; i++) s += model.score(data[t++ & 4095] as Float64Array);
      consume(s);
    }, 64, quick);
  const learnRun = (model: OselmAutoencoder) => (): number =>
    nsPerOp(() => {
      let s = 0;
      for (let i = 0; i < 64; i++) s += model.learn(data[t++ & 4095] as Float64Array);
      consume(s);
    }, 64, quick);
  const model64 = fitted("float64");
  const reference = new MatrixAutoencoder(fitted("float64"));
  let r = 0;
  const refScoreRun = (): number => nsPerOp(() => { let s = 0; for (let i = 0; i < 8; i++) s += reference.score(data[r++ & 4095] as Float64Array); consume(s); }, 8, quick);
  const refLearnRun = (): number => nsPerOp(() => { for (let i = 0; i < 8; i++) reference.learn(data[r++ & 4095] as Float64Array); consume(reference.p.get(0, 0)); }, 8, quick);
  const pool = new AutoencoderPool({ inputs: n, hidden: L, maxMembers: 4, seed: 5 });
  for (let m = 0; m < 4; m++) pool.addMember(rows(64, 10 + m));
  let q = 0;
  // pool of 4 members: score all, train the nearest (learnScored reuses the nearest's forward pass)
  const poolRun = (): number => nsPerOp(() => { for (let i = 0; i < 64; i++) consume(pool.learn(data[q++ & 4095] as Float64Array).loss); }, 64, quick);

  const [dotNs, scoreNs, learnNs, refScoreNs, refLearnNs, poolNs] = interleaved([dotRun, scoreRun(model64), learnRun(model64), refScoreRun, refLearnRun, poolRun]) as [number[], number[], number[], number[], number[], number[]];
  // (b): achieved multiply-adds per ns over the dot product's, per round
  // also the ratio of the fastest rounds, the closest this shared machine gets to an idle one
  const rate = (ma: number, ns: number[], dots = dotNs): string => {
    const achieved = median(ns.map((x) => ma / x));
    const fastest = Math.min(...dots) / (Math.min(...ns) / ma);
    return `${achieved.toFixed(3)} multiply-adds/ns = ${ratioOf(dots, ns.map((x) => x / ma)).toFixed(2)} × the dot-product rate (fastest rounds: ${fastest.toFixed(2)} ×)`;
  };
  report.add("dot product of two Float64Arrays (per multiply-add)", median(dotNs), baseline, `${(1 / median(dotNs)).toFixed(3)} multiply-adds/ns (median of ${dotNs.length} rounds)`);
  report.add("score 256-32-256 float64", median(scoreNs), baseline,
    `${(1e9 / median(scoreNs)).toFixed(0)} samples/s; (a) ${ratioOf(refScoreNs, scoreNs).toFixed(1)}× faster than ml-matrix (fastest rounds: ${(Math.min(...refScoreNs) / Math.min(...scoreNs)).toFixed(1)}×); (b) ${rate(SCORE_MA, scoreNs)}`);
  report.add("learn 256-32-256 float64", median(learnNs), baseline,
    `${(1e9 / median(learnNs)).toFixed(0)} samples/s; (a) ${ratioOf(refLearnNs, learnNs).toFixed(1)}× faster than ml-matrix (fastest rounds: ${(Math.min(...refLearnNs) / Math.min(...learnNs)).toFixed(1)}×); (b) ${rate(LEARN_MA, learnNs)}`);
  report.add("score, same algorithm in ml-matrix operations", median(refScoreNs), baseline, `${(1e9 / median(refScoreNs)).toFixed(0)} samples/s`);
  report.add("learn, same algorithm in ml-matrix operations", median(refLearnNs), baseline, `${(1e9 / median(refLearnNs)).toFixed(0)} samples/s`);
  report.add("pool of 4: score all + learn nearest", median(poolNs), baseline, `${(1e9 / median(poolNs)).toFixed(0)} samples/s; (b) ${rate(4 * SCORE_MA + UPDATE_MA, poolNs)}`);

  // learnChunk per sample for k = 1, 4, 16, 64, against learn in the same rounds
  const chunkRuns = [1, 4, 16, 64].map((k) => {
    const model = fitted("float64");
    const chunks = Array.from({ length: 64 }, (_, c) => data.slice((c * k) % 4032, ((c * k) % 4032) + k));
    let c = 0;
    return (): number => nsPerOp(() => { model.learnChunk(chunks[c++ & 63] as Float64Array[]); consume(model.count); }, k, quick);
  });
  const chunkTimes = interleaved([learnRun(fitted("float64")), ...chunkRuns], 5);
  [1, 4, 16, 64].forEach((k, i) => {
    const ns = chunkTimes[i + 1] as number[];
    report.add(`learnChunk k=${k}, per sample`, median(ns), baseline, `${(1e9 / median(ns)).toFixed(0)} samples/s; ${ratioOf(ns, chunkTimes[0] as number[]).toFixed(2)}× the cost of one learn`);
  });

  // float32 state last: from here on the shared loops also see Float32Array
  const model32 = fitted("float32");
  const [dot32, score32, learn32] = interleaved([dotRun, scoreRun(model32), learnRun(model32)], 5) as [number[], number[], number[]];
  report.add("score 256-32-256 float32", median(score32), baseline, `${(1e9 / median(score32)).toFixed(0)} samples/s; (b) ${rate(SCORE_MA, score32, dot32)}`);
  report.add("learn 256-32-256 float32", median(learn32), baseline, `${(1e9 / median(learn32)).toFixed(0)} samples/s; (b) ${rate(LEARN_MA, learn32, dot32)}`);
  report.write();
});
