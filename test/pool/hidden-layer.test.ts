import { describe, expect, it } from "vitest";
import { drawHiddenLayer, hiddenChecksum } from "../../packages/pool/src/hidden-layer.js";

describe("drawHiddenLayer", () => {
  it("draws W ~ Normal(0, 1/n) and b ~ Uniform(−1, 1), the same for the same seed", () => {
    const n = 256;
    const layer = drawHiddenLayer("PS-2", n, 64, "float64");
    const w = layer.weights;
    let mean = 0;
    for (const v of w) mean += v;
    mean /= w.length;
    let variance = 0;
    for (const v of w) variance += (v - mean) ** 2;
    variance /= w.length;
    // 16384 draws: the sample variance is within a few percent of 1/n (sd of the estimate ≈ 1.1%)
    expect(Math.abs(mean)).toBeLessThan(4 / Math.sqrt(w.length * n));
    expect(variance * n).toBeGreaterThan(0.95);
    expect(variance * n).toBeLessThan(1.05);
    for (const b of layer.biases) expect(Math.abs(b)).toBeLessThan(1);
    expect(drawHiddenLayer("PS-2", n, 64, "float64")).toEqual(layer);
    expect(drawHiddenLayer("PS-3", n, 64, "float64").checksum).not.toBe(layer.checksum);
  });

  it("the checksum changes when any single weight or bias changes by one unit in the last place", () => {
    const layer = drawHiddenLayer("a", 8, 4, "float64");
    for (const index of [0, 13, 31]) {
      const w = layer.weights.slice();
      w[index] = (w[index] as number) * (1 + Number.EPSILON);
      expect(hiddenChecksum(w, layer.biases)).not.toBe(layer.checksum);
    }
    const b = layer.biases.slice();
    b[3] = (b[3] as number) * (1 + Number.EPSILON);
    expect(hiddenChecksum(layer.weights, b)).not.toBe(layer.checksum);
  });

  it("float32 layers hold the float64 draws rounded to float32; without biases b is 0", () => {
    const f64 = drawHiddenLayer("x", 5, 3, "float64");
    const f32 = drawHiddenLayer("x", 5, 3, "float32");
    expect(Array.from(f32.weights)).toEqual(Array.from(f64.weights, Math.fround));
    expect(Array.from(drawHiddenLayer("x", 5, 3, "float64", false).biases)).toEqual([0, 0, 0]);
    expect(Array.from(drawHiddenLayer("x", 5, 3, "float64", false).weights)).toEqual(Array.from(f64.weights));
  });
});
