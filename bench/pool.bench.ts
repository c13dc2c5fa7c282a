import { it } from "vitest";
import { Matrix } from "ml-matrix";
import { RandomSource } from "@leeway/core";
import { AutoencoderPool, OselmAutoencoder, type AutoencoderPoolOptions, type Dtype, type Kernel } from "@leeway/pool";
import { BenchReport, consume } from "./harness.js";
import { interleave, ratio, show, spread, type Run, type Timing } from "./pool-timing.js";

// Pool speed, 256-32-256, in one run: every kernel is timed in rounds that
// alternate with its baselines, by process CPU time and by wall time, and each
// ratio is taken per round and shown as min / median / max over the rounds.
// Baselines:
// - dot4: a dot product of two Float64Arrays of L·n elements with four
//   accumulators (the machine's scalar multiply-add rate in this runtime);
//   a kernel's "× dot4" is its time over dot4's time for the same number of
//   multiply-adds (1 = as fast as the tight loop, 2 = half its rate).
// - ml-matrix: the same algorithm written plainly with ml-matrix operations
//   (β kept as it is and multiplied from the left by hᵀ, no transpose per
//   call, the sigmoid in a plain loop).
// Run: npm run bench -- bench/pool.bench.ts; figures go to docs/pool.md.

const n = 256;
const L = 32;
const ROUNDS = 7;
const MIN_MS = 60;
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

/** Σ a_i b_i with four accumulators. */
function dot4(a: Float64Array, b: Float64Array): number {
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  const m = a.length - (a.length % 4);
  let i = 0;
  for (; i < m; i += 4) {
    s0 += (a[i] as number) * (b[i] as number);
    s1 += (a[i + 1] as number) * (b[i + 1] as number);
    s2 += (a[i + 2] as number) * (b[i + 2] as number);
    s3 += (a[i + 3] as number) * (b[i + 3] as number);
  }
  for (; i < a.length; i++) s0 += (a[i] as number) * (b[i] as number);
  return s0 + s1 + (s2 + s3);
}

/** The same OS-ELM autoencoder in plain ml-matrix operations. */
class MatrixAutoencoder {
  readonly w: Matrix;
  readonly b: Matrix;
  readonly beta: Matrix;
  readonly p: Matrix;
  constructor(model: OselmAutoencoder) {
    const { weights, biases } = model.hiddenLayer();
    const beta = model.outputWeights();
    const p = model.inverseGram();
    this.w = new Matrix(L, n);
    this.beta = new Matrix(L, n);
    this.p = new Matrix(L, L);
    for (let i = 0; i < L; i++) {
      for (let j = 0; j < n; j++) {
        this.w.set(i, j, weights[i * n + j] as number);
        this.beta.set(i, j, beta[i * n + j] as number);
      }
      for (let j = 0; j < L; j++) this.p.set(i, j, p[i * L + j] as number);
    }
    this.b = Matrix.columnVector(Array.from(biases));
  }
  #forward(x: Float64Array): { h: Matrix; e: Matrix } {
    const z = Matrix.rowVector(Array.from(x));
    const h = this.w.mmul(z.transpose()).add(this.b); // L × 1
    for (let i = 0; i < L; i++) h.set(i, 0, 1 / (1 + Math.exp(-h.get(i, 0))));
    const e = Matrix.sub(z, h.transpose().mmul(this.beta)); // 1 × n: z − hᵀβ
    return { h, e };
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
    this.beta.add(k.mmul(e));
    this.p.sub(u.mmul(k.transpose()));
  }
}

function fitted(dtype: Dtype, data: Float64Array[], kernel: Kernel = "typescript"): OselmAutoencoder {
  const model = new OselmAutoencoder({ inputs: n, hidden: L, seed: 4, dtype, kernel });
  model.fit(data.slice(0, 64));
  return model;
}

function pool(data: Float64Array[], options: Partial<AutoencoderPoolOptions> = {}): AutoencoderPool {
  const p = new AutoencoderPool({ inputs: n, hidden: L, maxMembers: 4, seed: 5, kernel: "typescript", ...options });
  for (let m = 0; m < 4; m++) p.addMember(rows(64, 10 + m));
  void data;
  return p;
}

it("pool: OS-ELM autoencoder 256-32-256 and a pool of 4, against dot4 and ml-matrix", () => {
  const data = rows(4096, 1);
  const da = new RandomSource(2).fillUniform(new Float64Array(L * n));
  const db = new RandomSource(3).fillUniform(new Float64Array(L * n));
  let t = 0;
  const next = (): Float64Array => data[t++ & 4095] as Float64Array;
  const scoreRun = (model: OselmAutoencoder): Run => ({
    ops: 64,
    run: () => {
      let s = 0;
      for (let i = 0; i < 64; i++) s += model.score(next());
      consume(s);
    },
  });
  const learnRun = (model: OselmAutoencoder): Run => ({
    ops: 64,
    run: () => {
      let s = 0;
      for (let i = 0; i < 64; i++) s += model.learn(next());
      consume(s);
    },
  });
  const chunkRun = (model: OselmAutoencoder, k: number): Run => {
    const chunks = Array.from({ length: 64 }, (_, c) => data.slice((c * k) % (4096 - k), ((c * k) % (4096 - k)) + k));
    let c = 0;
    return { ops: k, run: () => consume(model.learnChunk(chunks[c++ & 63] as Float64Array[])) };
  };
  const reference = new MatrixAutoencoder(fitted("float64", data));
  const poolRun = (p: AutoencoderPool): Run => ({
    ops: 64,
    run: () => {
      let s = 0;
      for (let i = 0; i < 64; i++) s += p.learn(next()).loss;
      consume(s);
    },
  });
  const runs: Record<string, Run> = {
    dot4: { ops: L * n, run: () => consume(dot4(da, db)) },
    score64: scoreRun(fitted("float64", data)),
    learn64: learnRun(fitted("float64", data)),
    score32: scoreRun(fitted("float32", data)),
    learn32: learnRun(fitted("float32", data)),
    matrixScore: { ops: 8, run: () => { let s = 0; for (let i = 0; i < 8; i++) s += reference.score(next()); consume(s); } },
    matrixLearn: { ops: 8, run: () => { for (let i = 0; i < 8; i++) reference.learn(next()); consume(reference.p.get(0, 0)); } },
    pool4: poolRun(pool(data)),
    pool4shared: poolRun(pool(data, { sharedHiddenLayer: true })),
    scoreSimd: scoreRun(fitted("float64", data, "wasm-simd")),
    learnSimd: learnRun(fitted("float64", data, "wasm-simd")),
    pool4simd: poolRun(pool(data, { kernel: "wasm-simd" })),
    pool4sharedSimd: poolRun(pool(data, { kernel: "wasm-simd", sharedHiddenLayer: true })),
    score32simd: scoreRun(fitted("float32", data, "wasm-simd")),
    learn32simd: learnRun(fitted("float32", data, "wasm-simd")),
    pool4simd32: poolRun(pool(data, { kernel: "wasm-simd", dtype: "float32" })),
  };
  for (const k of [1, 4, 8, 16, 64]) runs[`chunk${k}`] = chunkRun(fitted("float64", data), k);
  for (const k of [8, 64]) runs[`chunkSimd${k}`] = chunkRun(fitted("float64", data, "wasm-simd"), k);
  const times = interleave(runs, ROUNDS, MIN_MS);
  const T = (name: string): Timing[] => times[name] as Timing[];

  const report = new BenchReport("pool");
  const dotMedian = spread(T("dot4").map((x) => x.cpu)).median;
  const line = (name: string, key: string, ma: number, extra: string): void => {
    const cpu = spread(T(key).map((x) => x.cpu));
    const wall = spread(T(key).map((x) => x.wall));
    const rate = spread(T(key).map((x) => 1e9 / x.cpu));
    report.add(name, cpu.median, dotMedian * ma,
      `× dot4 (CPU) ${show(ratio(T(key), T("dot4"), "cpu", 1, ma))}, (wall) ${show(ratio(T(key), T("dot4"), "wall", 1, ma))}; ` +
      `samples per CPU s ${show(rate, 0)}; ns CPU ${show(cpu, 0)}, wall ${show(wall, 0)}${extra}`);
  };
  report.add("dot4, per multiply-add", dotMedian, dotMedian,
    `CPU ns ${show(spread(T("dot4").map((x) => x.cpu)), 3)}, wall ns ${show(spread(T("dot4").map((x) => x.wall)), 3)}`);
  line("score 256-32-256 float64", "score64", SCORE_MA, `; ml-matrix/this (CPU) ${show(ratio(T("matrixScore"), T("score64"), "cpu"), 1)}`);
  line("learn 256-32-256 float64", "learn64", LEARN_MA, `; ml-matrix/this (CPU) ${show(ratio(T("matrixLearn"), T("learn64"), "cpu"), 1)}`);
  line("score, ml-matrix formulation", "matrixScore", SCORE_MA, "");
  line("learn, ml-matrix formulation", "matrixLearn", LEARN_MA, "");
  line("score 256-32-256 float32", "score32", SCORE_MA, `; float32/float64 (CPU) ${show(ratio(T("score32"), T("score64"), "cpu"))}`);
  line("learn 256-32-256 float32", "learn32", LEARN_MA, `; float32/float64 (CPU) ${show(ratio(T("learn32"), T("learn64"), "cpu"))}`);
  for (const k of [1, 4, 8, 16, 64]) {
    line(`learnChunk k=${k}, per sample`, `chunk${k}`, LEARN_MA, `; per sample / learn (CPU) ${show(ratio(T(`chunk${k}`), T("learn64"), "cpu"))}`);
  }
  line("pool of 4: score all + learn nearest", "pool4", 4 * SCORE_MA + UPDATE_MA, "");
  line("pool of 4, sharedHiddenLayer", "pool4shared", 5 * L * n + UPDATE_MA, `; shared/own (CPU) ${show(ratio(T("pool4shared"), T("pool4"), "cpu"))}`);
  line("score float64, kernel wasm-simd", "scoreSimd", SCORE_MA, `; typescript/simd (CPU) ${show(ratio(T("score64"), T("scoreSimd"), "cpu"))}`);
  line("learn float64, kernel wasm-simd", "learnSimd", LEARN_MA, `; typescript/simd (CPU) ${show(ratio(T("learn64"), T("learnSimd"), "cpu"))}`);
  line("pool of 4, kernel wasm-simd", "pool4simd", 4 * SCORE_MA + UPDATE_MA, `; typescript/simd (CPU) ${show(ratio(T("pool4"), T("pool4simd"), "cpu"))}`);
  line("pool of 4, wasm-simd + sharedHiddenLayer", "pool4sharedSimd", 5 * L * n + UPDATE_MA, `; typescript own layers/this (CPU) ${show(ratio(T("pool4"), T("pool4sharedSimd"), "cpu"))}`);
  line("score float32, kernel wasm-simd (f32x4)", "score32simd", SCORE_MA, `; float32 simd / float64 simd (CPU) ${show(ratio(T("score32simd"), T("scoreSimd"), "cpu"))}; float32 TS / float32 simd ${show(ratio(T("score32"), T("score32simd"), "cpu"))}`);
  line("learn float32, kernel wasm-simd (f32x4)", "learn32simd", LEARN_MA, `; float32 simd / float64 simd (CPU) ${show(ratio(T("learn32simd"), T("learnSimd"), "cpu"))}; float32 TS / float32 simd ${show(ratio(T("learn32"), T("learn32simd"), "cpu"))}`);
  line("pool of 4 float32, kernel wasm-simd", "pool4simd32", 4 * SCORE_MA + UPDATE_MA, `; float32 simd / float64 simd (CPU) ${show(ratio(T("pool4simd32"), T("pool4simd"), "cpu"))}`);
  for (const k of [8, 64]) {
    line(`learnChunk k=${k} wasm-simd, per sample`, `chunkSimd${k}`, LEARN_MA, `; per sample / learn wasm-simd (CPU) ${show(ratio(T(`chunkSimd${k}`), T("learnSimd"), "cpu"))}`);
  }
  report.write();
});
