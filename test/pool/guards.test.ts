import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { CholeskyDecomposition, Matrix } from "ml-matrix";
import { RandomSource, type Snapshot } from "@leeway/core";
import { AutoencoderPool, OselmAutoencoder, type AutoencoderPoolState, type OselmAutoencoderState } from "@leeway/pool";
import { gainIsSafe, LIMITS } from "../../packages/pool/src/numeric-limits.js";
import { expectLeewayError, throughJson } from "../support/errors.js";

const normalRow = (random: RandomSource, n: number): Float64Array => random.fillNormal(new Float64Array(n));

function stateOf(model: OselmAutoencoder): string {
  const { beta, p } = model.snapshot().state;
  return JSON.stringify([beta, p]);
}

function positiveDefinite(p: Float64Array, L: number): boolean {
  const m = new Matrix(L, L);
  for (let i = 0; i < L; i++) for (let j = 0; j < L; j++) m.set(i, j, p[i * L + j] as number);
  return new CholeskyDecomposition(m).isPositiveDefinite();
}

describe("OselmAutoencoder: guards sized to the dtype", () => {
  it("float32, TypeScript kernel: one row with x[3] = 1e45 after 50 normal rows is refused (β would leave float32's range), the state is kept, learning and restore go on", () => {
    const random = new RandomSource(1);
    const model = new OselmAutoencoder({ inputs: 16, hidden: 8, seed: 1, dtype: "float32", forgetting: 0.99, kernel: "typescript" });
    for (let i = 0; i < 50; i++) model.learn(normalRow(random, 16));
    const spike = normalRow(random, 16);
    spike[3] = 1e45;
    const before = stateOf(model);
    expectLeewayError(() => model.learn(spike), "E_STATE", "β", "float32", "unchanged");
    expect(stateOf(model)).toBe(before);
    expect(model.health()).toMatchObject({ refused: 1, lastRefusal: "beta-overflow", finite: true, ok: true });
    for (let i = 0; i < 500; i++) expect(Number.isFinite(model.learn(normalRow(random, 16)))).toBe(true);
    const copy = OselmAutoencoder.restore(throughJson(model.snapshot()));
    const x = normalRow(random, 16);
    expect(copy.score(x)).toBe(model.score(x));
  });

  it("float32, default f32x4 kernel: a row with x[3] = 1e45 (beyond float32) is refused as a sample before anything changes, and learning goes on", () => {
    const random = new RandomSource(1);
    const model = new OselmAutoencoder({ inputs: 16, hidden: 8, seed: 1, dtype: "float32", forgetting: 0.99 });
    for (let i = 0; i < 50; i++) model.learn(normalRow(random, 16));
    const spike = normalRow(random, 16);
    spike[3] = 1e45;
    const before = stateOf(model);
    expectLeewayError(() => model.learn(spike), "E_SAMPLE", "x");
    expect(stateOf(model)).toBe(before);
    expect(model.health()).toMatchObject({ refused: 0, finite: true, ok: true });
    for (let i = 0; i < 500; i++) expect(Number.isFinite(model.learn(normalRow(random, 16)))).toBe(true);
  });

  it("float64, identity, λ = 0.99: one row with an entry of 1e150 among N(0,1) rows is refused as an unsafe gain and no later row is refused", () => {
    const random = new RandomSource(3);
    const model = new OselmAutoencoder({ inputs: 16, hidden: 8, seed: 3, activation: "identity", forgetting: 0.99 });
    for (let i = 0; i < 100; i++) model.learn(normalRow(random, 16));
    const spike = normalRow(random, 16);
    spike[1] = 1e150;
    const before = stateOf(model);
    expectLeewayError(() => model.learn(spike), "E_STATE", "curvature", "float64");
    expect(stateOf(model)).toBe(before);
    for (let i = 0; i < 5000; i++) model.learn(normalRow(random, 16)); // throws on any refusal
    const health = model.health();
    expect(health).toMatchObject({ refused: 1, resets: 0, positiveDefinite: true, ok: true });
    expect(health.trace).toBeGreaterThan(0);
    expect(positiveDefinite(model.inverseGram(), 8)).toBe(true);
  });

  it("float32, identity, λ = 0.999, inputs near 1e6: the model is re-anchored after 8 refused rows in a row and then learns; P stays positive definite (covariance resetting)", () => {
    const random = new RandomSource(2);
    const model = new OselmAutoencoder({ inputs: 16, hidden: 8, seed: 2, dtype: "float32", activation: "identity", forgetting: 0.999 });
    const centre = random.fillNormal(new Float64Array(16), 1e6, 1e4);
    const row = (): Float64Array => Float64Array.from(centre, (v) => v + 1e3 * random.normal());
    let refused = 0;
    for (let i = 0; i < 5000; i++) {
      try {
        model.learn(row());
      } catch {
        refused++;
      }
    }
    const health = model.health();
    expect(health.resets).toBeGreaterThan(0);
    expect(health.lastReset).toBe("persistent-refusals");
    expect(refused).toBeLessThan(500); // measured: about 150 of 5000
    expect(health.ok).toBe(true);
    expect(positiveDefinite(model.inverseGram(), 8)).toBe(true);
    // it has learnt the stream: the reconstruction error is far below the input energy (≈ 1e12 per element)
    expect(model.score(row())).toBeLessThan(1e8);
    const copy = OselmAutoencoder.restore(throughJson(model.snapshot()));
    const x = row();
    expect(copy.learn(x)).toBe(model.learn(x));
    expect(stateOf(copy)).toBe(stateOf(model));
  });

  it("a snapshot cut anywhere in a stream with refusals and re-anchoring continues bit for bit", () => {
    const stream = (seed: number): Float64Array[] => {
      const random = new RandomSource(seed);
      return Array.from({ length: 600 }, (_, t) => {
        const x = random.fillNormal(new Float64Array(6), t < 300 ? 0 : 1e6, t < 300 ? 1 : 1e3);
        if (t % 97 === 5) x[2] = 1e40;
        return x;
      });
    };
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 599 }), fc.constantFrom("float32" as const, "float64" as const), (cut, dtype) => {
        const rows = stream(7);
        const options = { inputs: 6, hidden: 4, seed: 7, dtype, activation: "identity" as const, forgetting: 0.995 };
        const run = (model: OselmAutoencoder, from: number, to: number, out: number[]): void => {
          for (let t = from; t < to; t++) {
            try {
              out.push(model.learn(rows[t] as Float64Array));
            } catch {
              out.push(-1);
            }
          }
        };
        const whole = new OselmAutoencoder(options);
        const a: number[] = [];
        run(whole, 0, 600, a);
        const first = new OselmAutoencoder(options);
        const b: number[] = [];
        run(first, 0, cut, b);
        const second = OselmAutoencoder.restore(throughJson(first.snapshot()));
        run(second, cut, 600, b);
        expect(b).toEqual(a);
        expect(stateOf(second)).toBe(stateOf(whole));
        expect(second.health()).toEqual(whole.health());
      }),
      { numRuns: 25 },
    );
  });

  it("identity activation with an all-zero input is refused with a message about the zero hidden layer, not about P", () => {
    const model = new OselmAutoencoder({ inputs: 4, hidden: 3, seed: 6, activation: "identity" });
    const before = stateOf(model);
    expectLeewayError(() => model.learn(new Float64Array(4)), "E_STATE", "hidden layer is all zero", "identity");
    expect(stateOf(model)).toBe(before);
    expect(model.health()).toMatchObject({ refused: 1, lastRefusal: "hidden-layer-zero", resets: 0 });
  });

  it("score and learn refuse non-numbers with E_SAMPLE naming the element and its type, also under nonFinite: skip (no coercion of strings, null, arrays, booleans or bigints)", () => {
    for (const nonFinite of ["refuse", "skip"] as const) {
      const model = new OselmAutoencoder({ inputs: 2, hidden: 3, seed: 7, nonFinite });
      const pool = new AutoencoderPool({ inputs: 2, hidden: 3, maxMembers: 1, seed: 7, spawnPatience: 1, nonFinite });
      pool.learn([1, 2]);
      const cases: [unknown[], string][] = [[[1, "2"], 'x[1]'], [[null, 1], "x[0]"], [[[7], 1], "x[0]"], [[true, 1], "x[0]"], [[1, 1n], "x[1]"]];
      for (const [x, element] of cases) {
        const v = x as number[];
        expectLeewayError(() => model.score(v), "E_SAMPLE", element, "a number", "(");
        expectLeewayError(() => model.learn(v), "E_SAMPLE", element);
        expectLeewayError(() => model.learnChunk([v]), "E_SAMPLE", `rows[0]${element.slice(1)}`);
        expectLeewayError(() => pool.score(v), "E_SAMPLE", element);
        expectLeewayError(() => pool.learn(v), "E_SAMPLE", element);
      }
      expect(model.skipped + pool.skipped).toBe(0);
    }
  });
});

describe("gainIsSafe", () => {
  it("an update it calls safe keeps a float32-rounded P positive definite (Cholesky, ml-matrix), over random P and h of every scale", () => {
    fc.assert(
      fc.property(fc.integer({ min: 2, max: 8 }), fc.integer({ min: 0, max: 1e6 }), fc.integer({ min: -3, max: 8 }), fc.constantFrom(1, 0.99), (L, seed, scale, lambda) => {
        const random = new RandomSource(seed);
        const a = Matrix.rand(L, L + 1, { random: () => random.normal() });
        const p = a.mmul(a.transpose()).add(Matrix.eye(L).mul(0.01));
        const h = Matrix.columnVector(Array.from(random.fillNormal(new Float64Array(L)), (v) => v * 10 ** scale));
        const u = p.mmul(h);
        const c = h.transpose().mmul(u).get(0, 0);
        let hh = 0;
        let maxDiagonal = 0;
        for (let i = 0; i < L; i++) {
          hh += h.get(i, 0) ** 2;
          maxDiagonal = Math.max(maxDiagonal, p.get(i, i));
        }
        // P itself in float32 first, as the state holds it
        const p32 = Float32Array.from(p.to1DArray());
        const next = new Float64Array(L * L);
        for (let i = 0; i < L; i++) {
          for (let j = i; j < L; j++) {
            const v = Math.fround(((p32[i * L + j] as number) - (u.get(i, 0) * u.get(j, 0)) / (lambda + c)) / lambda);
            next[i * L + j] = v;
            next[j * L + i] = v;
          }
        }
        if (gainIsSafe(c, hh, maxDiagonal, lambda, L, LIMITS.float32)) expect(positiveDefinite(next, L)).toBe(true);
      }),
      { numRuns: 400 },
    );
  });
});

describe("AutoencoderPool: restore validates meaning", () => {
  it("a snapshot with an empty member list although a member was started (spawned 1) is refused, naming members", () => {
    const pool = new AutoencoderPool({ inputs: 4, hidden: 3, maxMembers: 2, seed: 5, spawnPatience: 3 });
    const random = new RandomSource(5);
    for (let i = 0; i < 3; i++) pool.learn(normalRow(random, 4));
    const s = throughJson(pool.snapshot()) as Snapshot<AutoencoderPoolState>;
    expect(s.state.spawned).toBe(1);
    s.state.members = [];
    expectLeewayError(() => AutoencoderPool.restore(s), "E_SNAPSHOT", "members", "1");
  });

  it("a member whose P is not positive definite makes the whole pool snapshot refused", () => {
    const pool = new AutoencoderPool({ inputs: 4, hidden: 3, maxMembers: 2, seed: 5, spawnPatience: 3 });
    const random = new RandomSource(6);
    for (let i = 0; i < 3; i++) pool.learn(normalRow(random, 4));
    const s = throughJson(pool.snapshot()) as Snapshot<AutoencoderPoolState>;
    const member = s.state.members[0]?.model as Snapshot<OselmAutoencoderState>;
    member.state.p[1] = 1e3;
    expectLeewayError(() => AutoencoderPool.restore(s), "E_SNAPSHOT", "positive definite");
  });
});
