import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { Matrix, SingularValueDecomposition, solve } from "ml-matrix";
import { RandomSource } from "@leeway/core";
import { OselmAutoencoder, type Activation } from "@leeway/pool";

// Outside reference: ml-matrix (general-purpose linear algebra) solving the
// closed forms below, with the hidden activations recomputed here from the
// model's hidden weights.
// - OS-ELM: Liang, Huang, Saratchandran & Sundararajan (2006), IEEE Trans.
//   Neural Networks 17(6):1411–1423 (equations from memory).
// - Regularized start P₀ = (H₀ᵀH₀ + δI)⁻¹: Huynh & Won (2011), ReOS-ELM (from memory).
// - Exponential forgetting: RLS as in Haykin, Adaptive Filter Theory (from memory).
// Identities (check-values §7, computed): after the updates β equals the batch
// ridge solution; with forgetting λ, the weighted ridge solution with weight
// λ^(N−i) on row i (i = 1..N learnt sequentially) and λ^(N) on the fit rows and on δ.

function hiddenMatrix(model: OselmAutoencoder, rows: Float64Array[], activation: Activation): Matrix {
  const { weights, biases } = model.hiddenLayer();
  const n = model.inputs;
  const L = model.hidden;
  const w = new Matrix(L, n);
  for (let i = 0; i < L; i++) for (let j = 0; j < n; j++) w.set(i, j, weights[i * n + j] as number);
  const x = new Matrix(rows.map((r) => Array.from(r)));
  const pre = x.mmul(w.transpose()).addRowVector(Array.from(biases));
  const g = activation === "sigmoid" ? (s: number) => 1 / (1 + Math.exp(-s)) : activation === "tanh" ? Math.tanh : (s: number) => s;
  const h = new Matrix(rows.length, L);
  for (let r = 0; r < rows.length; r++) for (let i = 0; i < L; i++) h.set(r, i, g(pre.get(r, i)));
  return h;
}

/** argmin_β Σ w_r ‖z_r − βᵀh_r‖² + δ_eff‖β‖², solved by ml-matrix. */
function weightedRidge(h: Matrix, z: Matrix, weights: number[], ridge: number): Matrix {
  const hw = h.clone();
  for (let r = 0; r < h.rows; r++) for (let i = 0; i < h.columns; i++) hw.set(r, i, h.get(r, i) * (weights[r] as number));
  const gram = hw.transpose().mmul(h).add(Matrix.eye(h.columns).mul(ridge));
  return solve(gram, hw.transpose().mmul(z));
}

/** κ₂(HᵀH + δI), the 2-norm condition number of the regularized Gram matrix (ml-matrix SVD). */
function gramCondition(h: Matrix, ridge: number): number {
  const gram = h.transpose().mmul(h).add(Matrix.eye(h.columns).mul(ridge));
  return new SingularValueDecomposition(gram).condition;
}

function relativeDifference(beta: Float64Array, reference: Matrix): number {
  let diff = 0;
  let size = 0;
  const n = reference.columns;
  for (let i = 0; i < reference.rows; i++) {
    for (let j = 0; j < n; j++) {
      diff = Math.max(diff, Math.abs((beta[i * n + j] as number) - reference.get(i, j)));
      size = Math.max(size, Math.abs(reference.get(i, j)));
    }
  }
  return diff / size;
}

function randomRows(seed: number, count: number, n: number, spread = 1): Float64Array[] {
  const random = new RandomSource(seed);
  // rows with some shared structure (a random mean and two common directions) plus noise
  const mean = random.fillNormal(new Float64Array(n));
  const d1 = random.fillNormal(new Float64Array(n));
  const d2 = random.fillNormal(new Float64Array(n));
  return Array.from({ length: count }, () => {
    const a = random.normal();
    const b = random.normal();
    return Float64Array.from(mean, (m, j) => spread * (m + a * (d1[j] as number) + b * (d2[j] as number) + 0.3 * random.normal()));
  });
}

const activations: Activation[] = ["sigmoid", "tanh", "identity"];

describe("OselmAutoencoder against closed-form ridge regression (ml-matrix)", () => {
  // The forward error of a backward-stable solve is about κ·ε (Higham, Accuracy and
  // Stability of Numerical Algorithms, 2nd ed., §7.1 and ch. 10; from memory), and
  // each covariance-form RLS step adds about that much again, so a fixed 1e-9 cannot
  // hold once κ passes about 1e6 (n = 1 with the identity activation gives a rank-one
  // HᵀH, κ ≈ 1 + ‖H‖²/δ). The bound is 1e-9 or FORWARD_ERROR_FACTOR·(N + 1)·κ·ε.
  const FORWARD_ERROR_FACTOR = 64;
  it("N sequential learn calls from P₀ = (H₀ᵀH₀ + δI)⁻¹ give the batch ridge solution over all rows to max(1e-9, 64·(N+1)·κ·ε) relative, κ = cond(HᵀH + δI) (Liang et al. 2006; Huynh & Won 2011; Higham 2002 §7.1; from memory)", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 12 }),
        fc.integer({ min: 1, max: 10 }),
        fc.integer({ min: 1, max: 30 }),
        fc.integer({ min: 1, max: 40 }),
        fc.constantFrom(...activations),
        fc.constantFrom(1e-3, 0.01, 1),
        fc.integer({ min: 0, max: 1e6 }),
        (n, L, initial, sequential, activation, ridge, seed) => {
          const rows = randomRows(seed, initial + sequential, n);
          const model = new OselmAutoencoder({ inputs: n, hidden: L, activation, ridge, seed });
          model.fit(rows.slice(0, initial));
          for (let r = initial; r < rows.length; r++) model.learn(rows[r] as Float64Array);
          const h = hiddenMatrix(model, rows, activation);
          const reference = weightedRidge(h, new Matrix(rows.map((r) => Array.from(r))), rows.map(() => 1), ridge);
          const bound = Math.max(1e-9, FORWARD_ERROR_FACTOR * (sequential + 1) * gramCondition(h, ridge) * Number.EPSILON);
          expect(relativeDifference(model.outputWeights(), reference)).toBeLessThan(bound);
        },
      ),
      {
        numRuns: 60,
        // regression cases: fit formed β as P·HᵀZ with the explicit inverse (error 1.1e-9 at κ = 1.4e5, now 1.6e-11),
        // and the second exceeds any fixed 1e-9 through κ = 5.3e6 alone (error 1.7e-7 after 24 steps)
        examples: [
          [1, 8, 13, 1, "identity", 0.001, 13],
          [1, 5, 27, 24, "identity", 0.001, 945418],
        ],
      },
    );
  });

  it("fit solves the regularized normal equations to the accuracy of a backward-stable solve: rank-one H, κ = 1.4e5, error below 100·κ·ε (regression for the explicit-inverse β; closed form of a rank-one ridge problem, common practice, no source)", () => {
    // n = 1, identity activation: h_r = w·x_r, so β = w·Σx² / (Σx²·‖w‖² + δ) exactly
    const rows = randomRows(13, 13, 1);
    const ridge = 0.001;
    const model = new OselmAutoencoder({ inputs: 1, hidden: 8, activation: "identity", ridge, seed: 13 });
    model.fit(rows);
    const w = model.hiddenLayer().weights;
    let w2 = 0;
    for (const v of w) w2 += v * v;
    let xx = 0;
    for (const r of rows) xx += (r[0] as number) ** 2;
    const exact = Matrix.columnVector(Array.from(w, (v) => (v * xx) / (xx * w2 + ridge)));
    const kappa = (xx * w2 + ridge) / ridge;
    expect(kappa).toBeGreaterThan(1e5);
    expect(relativeDifference(model.outputWeights(), exact)).toBeLessThan(100 * kappa * Number.EPSILON);
  });

  it("learning from the prior P = I/δ, β = 0 (no batch) also gives the batch ridge solution (check-values §7, computed identity)", () => {
    const rows = randomRows(11, 50, 8);
    const model = new OselmAutoencoder({ inputs: 8, hidden: 6, ridge: 0.5, seed: "prior" });
    for (const row of rows) model.learn(row);
    const reference = weightedRidge(hiddenMatrix(model, rows, "sigmoid"), new Matrix(rows.map((r) => Array.from(r))), rows.map(() => 1), 0.5);
    expect(relativeDifference(model.outputWeights(), reference)).toBeLessThan(1e-9);
  });

  it("with forgetting λ < 1, β is the weighted ridge solution with weights λ^(N−i) (Haykin, RLS with exponential forgetting; from memory)", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 10 }),
        fc.integer({ min: 1, max: 8 }),
        fc.integer({ min: 1, max: 20 }),
        fc.integer({ min: 1, max: 60 }),
        fc.constantFrom(0.9, 0.97, 0.995),
        fc.constantFrom(...activations),
        fc.integer({ min: 0, max: 1e6 }),
        (n, L, initial, sequential, lambda, activation, seed) => {
          const ridge = 0.05;
          const rows = randomRows(seed, initial + sequential, n);
          // trace bound far away, so that the forgetting is the plain exponential one
          const model = new OselmAutoencoder({ inputs: n, hidden: L, activation, ridge, forgetting: lambda, traceBound: 1e200, seed });
          model.fit(rows.slice(0, initial));
          for (let r = initial; r < rows.length; r++) model.learn(rows[r] as Float64Array);
          const N = sequential;
          // fit rows and δ carry λ^N; the i-th sequential row (i = 1..N) carries λ^(N−i)
          const weights = rows.map((_, r) => (r < initial ? lambda ** N : lambda ** (N - (r - initial + 1))));
          const h = hiddenMatrix(model, rows, activation);
          const reference = weightedRidge(h, new Matrix(rows.map((r) => Array.from(r))), weights, ridge * lambda ** N);
          expect(relativeDifference(model.outputWeights(), reference)).toBeLessThan(1e-9);
          expect(model.health().windupLimited).toBe(0);
        },
      ),
      { numRuns: 60 },
    );
  });

  it("learnChunk (Woodbury) gives the same batch ridge solution as the closed form (Liang et al. 2006, chunk update; from memory)", () => {
    const rows = randomRows(5, 90, 10);
    const model = new OselmAutoencoder({ inputs: 10, hidden: 7, ridge: 0.01, seed: 9, activation: "tanh" });
    model.fit(rows.slice(0, 20));
    model.learnChunk(rows.slice(20, 33));
    model.learnChunk(rows.slice(33, 34));
    model.learnChunk(rows.slice(34, 90));
    const reference = weightedRidge(hiddenMatrix(model, rows, "tanh"), new Matrix(rows.map((r) => Array.from(r))), rows.map(() => 1), 0.01);
    expect(relativeDifference(model.outputWeights(), reference)).toBeLessThan(1e-9);
  });

  it("with identity activation and L ≥ n every input reconstructs with loss ≈ 0 (linear algebra: the linear map h = Wz has full column rank, so β can invert it; with identity activation the layer has no bias; common practice, no source)", () => {
    // With n linearly independent training inputs the least-squares β (ridge → 0)
    // is a left inverse of W, so inputs never seen reconstruct too; the tolerance
    // leaves room for the tiny ridge and rounding.
    for (const [n, L] of [[4, 4], [6, 9], [16, 20]] as const) {
      const model = new OselmAutoencoder({ inputs: n, hidden: L, activation: "identity", ridge: 1e-10, seed: n });
      const training = randomRows(n, 3 * n, n);
      model.fit(training);
      const random = new RandomSource(100 + n);
      for (let t = 0; t < 20; t++) {
        const x = random.fillNormal(new Float64Array(n), 0, 5);
        let energy = 0;
        for (const v of x) energy += v * v;
        expect(model.score(x) / (energy / n)).toBeLessThan(1e-6);
      }
    }
  });

  it("with identity activation and L < n an input off the learnt subspace does not reconstruct (the fact above needs L ≥ n)", () => {
    const model = new OselmAutoencoder({ inputs: 8, hidden: 3, activation: "identity", ridge: 1e-10, seed: 1 });
    model.fit(randomRows(1, 30, 8));
    const x = new RandomSource(2).fillNormal(new Float64Array(8), 0, 5);
    expect(model.score(x)).toBeGreaterThan(1);
  });
});
