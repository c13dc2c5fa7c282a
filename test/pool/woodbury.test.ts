import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { CholeskyDecomposition, Matrix } from "ml-matrix";
import { RandomSource } from "@leeway/core";
import { choleskyInPlace, choleskySolveRows } from "../../packages/pool/src/woodbury.js";

describe("Cholesky helpers of the Woodbury update", () => {
  it("factor and solve agree with ml-matrix on random symmetric positive definite systems", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 12 }), fc.integer({ min: 1, max: 6 }), fc.integer({ min: 0, max: 1e6 }), (k, width, seed) => {
        const random = new RandomSource(seed);
        const a = Matrix.rand(k, k + 2, { random: () => random.next() });
        const spd = a.mmul(a.transpose()).add(Matrix.eye(k).mul(0.1));
        const rhs = Matrix.rand(k, width, { random: () => random.next() });
        const m = Float64Array.from(spd.to1DArray());
        expect(choleskyInPlace(m, k)).toBe(true);
        const lower = new CholeskyDecomposition(spd).lowerTriangularMatrix;
        for (let i = 0; i < k; i++) for (let j = 0; j <= i; j++) expect(m[i * k + j]).toBeCloseTo(lower.get(i, j), 10);
        const b = Float64Array.from(rhs.to1DArray());
        choleskySolveRows(m, k, b, width);
        const x = new CholeskyDecomposition(spd).solve(rhs);
        for (let i = 0; i < k; i++) for (let j = 0; j < width; j++) expect(b[i * width + j]).toBeCloseTo(x.get(i, j), 8);
      }),
      { numRuns: 60 },
    );
  });

  it("refuses a matrix that is not positive definite", () => {
    expect(choleskyInPlace(Float64Array.of(1, 2, 2, 1), 2)).toBe(false);
    expect(choleskyInPlace(Float64Array.of(Number.NaN), 1)).toBe(false);
  });
});
