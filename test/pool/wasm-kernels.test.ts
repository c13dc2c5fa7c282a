import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import wabtInit from "wabt";
import { RandomSource } from "@leeway/core";
import { AutoencoderPool, OselmAutoencoder, type Activation } from "@leeway/pool";
import { KERNELS_BASE64 } from "../../packages/pool/src/wasm-binary.js";
import { expectLeewayError, throughJson } from "../support/errors.js";

function rows(seed: number, count: number, n: number): Float64Array[] {
  const random = new RandomSource(seed);
  const centre = random.fillNormal(new Float64Array(n));
  return Array.from({ length: count }, () => Float64Array.from(centre, (c) => c + 0.3 * random.normal()));
}

describe("WebAssembly SIMD kernels", () => {
  it("src/wasm-binary.ts holds exactly the bytes that wabt assembles from packages/pool/wasm/kernels.wat", async () => {
    const wabt = await wabtInit();
    const source = readFileSync(new URL("../../packages/pool/wasm/kernels.wat", import.meta.url), "utf8");
    const module = wabt.parseWat("kernels.wat", source, { simd: true, bulk_memory: true });
    module.validate();
    const { buffer } = module.toBinary({});
    module.destroy();
    expect(Buffer.from(buffer).toString("base64")).toBe(KERNELS_BASE64);
  });

  it("a wasm-simd model gives the same readings and state as the TypeScript reference, bit for bit (fit, score, learn, learnChunk; odd sizes, every activation)", () => {
    for (const [n, L, activation] of [[256, 32, "sigmoid"], [13, 7, "tanh"], [9, 5, "identity"], [1, 3, "sigmoid"]] as [number, number, Activation][]) {
      const data = rows(n, 200, n);
      const options = { inputs: n, hidden: L, seed: `PS-2/${n}`, activation, forgetting: 0.995 };
      const reference = new OselmAutoencoder({ ...options, kernel: "typescript" });
      const simd = new OselmAutoencoder({ ...options, kernel: "wasm-simd" });
      expect(simd.fit(data.slice(0, 40))).toBe(reference.fit(data.slice(0, 40)));
      for (const x of data.slice(40, 150)) {
        expect(simd.score(x)).toBe(reference.score(x));
        expect(simd.learn(x)).toBe(reference.learn(x));
      }
      expect(simd.learnChunk(data.slice(150, 170))).toBe(reference.learnChunk(data.slice(150, 170)));
      for (const x of data.slice(170)) {
        reference.score(x);
        simd.score(x);
        expect(simd.learnScored()).toBe(reference.learnScored());
      }
      expect(simd.outputWeights()).toEqual(reference.outputWeights());
      expect(simd.inverseGram()).toEqual(reference.inverseGram());
    }
  });

  it("the default kernel is wasm-simd for float64 and for float32 state", () => {
    expect(new OselmAutoencoder({ inputs: 4, hidden: 2, seed: 1 }).snapshot().state.kernel).toBe("wasm-simd");
    expect(new OselmAutoencoder({ inputs: 4, hidden: 2, seed: 1, dtype: "float32" }).snapshot().state.kernel).toBe("wasm-simd");
  });

  it("a chunk's β update in the kernel equals the TypeScript loop bit for bit (blocks of four rows, rows left over, an odd input count)", () => {
    const data = rows(21, 120, 33);
    const options = { inputs: 33, hidden: 16, seed: "PS-2/chunk" };
    const reference = new OselmAutoencoder({ ...options, kernel: "typescript" });
    const simd = new OselmAutoencoder({ ...options, kernel: "wasm-simd" });
    reference.fit(data.slice(0, 40));
    simd.fit(data.slice(0, 40));
    // 16·33/(16 + 33) = 10 rows fit the kernel's buffers: 7 and 10 run there, 23 runs the TypeScript loop
    for (const [from, to] of [[40, 47], [47, 57], [57, 80], [80, 82], [82, 87]]) {
      expect(simd.learnChunk(data.slice(from, to))).toBe(reference.learnChunk(data.slice(from, to)));
      expect(simd.outputWeights()).toEqual(reference.outputWeights());
      expect(simd.inverseGram()).toEqual(reference.inverseGram());
    }
    for (const x of data.slice(87)) expect(simd.score(x)).toBe(reference.score(x));
  });

  it("the kernel is recorded in the snapshot, a restored model continues on it bit for bit", () => {
    const data = rows(3, 80, 16);
    const model = new OselmAutoencoder({ inputs: 16, hidden: 6, seed: 3, kernel: "wasm-simd" });
    for (const x of data.slice(0, 40)) model.learn(x);
    const snapshot = throughJson(model.snapshot());
    expect(snapshot.state.kernel).toBe("wasm-simd");
    const copy = OselmAutoencoder.restore(snapshot);
    for (const x of data.slice(40)) expect(copy.learn(x)).toBe(model.learn(x));
    expect(copy.clone().snapshot()).toEqual(model.snapshot());
    expectLeewayError(() => new OselmAutoencoder({ inputs: 4, hidden: 2, seed: 1, kernel: "avx" as "wasm-simd" }), "E_OPTION", "kernel");
  });

  it("a pool with kernel wasm-simd (and a shared hidden layer) learns exactly as the TypeScript pool", () => {
    const data = [...rows(4, 60, 24), ...rows(5, 60, 24)];
    for (const sharedHiddenLayer of [false, true]) {
      const options = { inputs: 24, hidden: 8, maxMembers: 3, seed: 9, spawnLoss: 0.5, spawnPatience: 10, sharedHiddenLayer };
      const reference = new AutoencoderPool({ ...options, kernel: "typescript" });
      const simd = new AutoencoderPool({ ...options, kernel: "wasm-simd" });
      for (const x of data) expect(simd.learn(x)).toEqual(reference.learn(x));
      const copy = AutoencoderPool.restore(throughJson(simd.snapshot()));
      for (const x of data.slice(0, 20)) expect(copy.learn(x)).toEqual(reference.learn(x));
    }
  });

  it("float32 state on the f32x4 kernels (arithmetic in float32) scores within 1e-4 of the mean squared input of the TypeScript reference, learns alike, and restores bit for bit (common practice, no source)", () => {
    const random = new RandomSource("f32x4");
    const n = 37; // odd, so the kernels' scalar tails run too
    const shape = Float64Array.from({ length: n }, (_, j) => 1 + Math.sin(j / 3));
    const row = (): Float64Array => Float64Array.from(shape, (v) => v + 0.05 * random.normal());
    const simd = new OselmAutoencoder({ inputs: n, hidden: 11, seed: 5, dtype: "float32", kernel: "wasm-simd" });
    const reference = new OselmAutoencoder({ inputs: n, hidden: 11, seed: 5, dtype: "float32", kernel: "typescript" });
    const fit = Array.from({ length: 30 }, row);
    simd.fit(fit);
    reference.fit(fit);
    for (let t = 0; t < 200; t++) {
      const x = row();
      let meanSquare = 0;
      for (const v of x) meanSquare += v * v / n;
      const a = simd.learn(x);
      const b = reference.learn(x);
      expect(Math.abs(a - b)).toBeLessThanOrEqual(1e-4 * meanSquare);
    }
    const x = row();
    expect(Math.abs(simd.score(x) - reference.score(x))).toBeLessThanOrEqual(1e-4);
    expect(simd.snapshot().state.kernel).toBe("wasm-simd");
    const copy = OselmAutoencoder.restore(throughJson(simd.snapshot()));
    for (let t = 0; t < 20; t++) {
      const y = row();
      expect(copy.learn(y)).toBe(simd.learn(y));
    }
    expect(JSON.stringify(copy.snapshot())).toBe(JSON.stringify(simd.snapshot()));
  });
});
