import { describe, expect, it } from "vitest";
import { RandomSource, SnapshotError } from "@leeway/core";
import { AutoencoderPool, FrozenModel, OselmAutoencoder, type Activation, type Dtype } from "@leeway/pool";
import { expectLeewayError, throughJson } from "../support/errors.js";

// Regression cases of the fuzz census: snapshots holding absurd finite state, and inputs near
// Number.MAX_VALUE, once gave infinite scores; a refused sample once advanced the pool's use clock.

const n = 6;
function rows(count: number, seed: string): Float64Array[] {
  const random = new RandomSource(seed);
  return Array.from({ length: count }, () => Float64Array.from({ length: n }, (_, j) => Math.sin(j + 1) + 0.2 * random.normal()));
}

function trained(dtype: Dtype, activation: Activation): OselmAutoencoder {
  const model = new OselmAutoencoder({ inputs: n, hidden: 4, seed: 2, dtype, activation });
  for (const row of rows(30, "train")) model.learn(row);
  return model;
}

const SETUPS: [Dtype, Activation][] = [["float64", "sigmoid"], ["float64", "tanh"], ["float64", "identity"], ["float32", "sigmoid"], ["float32", "identity"]];

describe("OselmAutoencoder and FrozenModel: absurd finite state and inputs", () => {
  for (const [dtype, activation] of SETUPS) {
    it(`${dtype} ${activation}: an input near ±Number.MAX_VALUE is refused by score and learn with E_SAMPLE, the snapshot bit-identical (common practice, no source)`, () => {
      const model = trained(dtype, activation);
      const before = JSON.stringify(model.snapshot());
      for (const value of [Number.MAX_VALUE, -Number.MAX_VALUE, 1e300]) {
        const x = rows(1, "spike")[0] as Float64Array;
        x[2] = value;
        expectLeewayError(() => model.learn(x), "E_SAMPLE", "overflows");
        expectLeewayError(() => model.score(x), "E_SAMPLE", "overflows");
        expectLeewayError(() => FrozenModel.from(model).score(x), "E_SAMPLE", "overflows");
      }
      expect(JSON.stringify(model.snapshot())).toBe(before);
      expect(Number.isFinite(model.score(rows(1, "after")[0] as Float64Array))).toBe(true);
    });
  }

  it("a snapshot with an entry of β at ±1e300 (beyond the dtype's β range) is refused whole, also inside a FrozenModel or a pool", () => {
    for (const dtype of ["float64", "float32"] as const) {
      for (const value of [1e300, -1e300, dtype === "float32" ? 1e19 : 1e151]) {
        const snapshot = throughJson(trained(dtype, "sigmoid").snapshot());
        snapshot.state.beta[3] = dtype === "float32" ? Math.fround(value) : value;
        expect(() => OselmAutoencoder.restore(snapshot)).toThrow(SnapshotError);
        expectLeewayError(() => OselmAutoencoder.restore(snapshot), "E_SNAPSHOT", "beta");
        const frozen = throughJson(FrozenModel.from(trained(dtype, "sigmoid")).snapshot());
        frozen.state.model.state.beta[0] = snapshot.state.beta[3];
        expectLeewayError(() => FrozenModel.restore(frozen), "E_SNAPSHOT", "beta");
      }
    }
    const pool = new AutoencoderPool({ inputs: n, hidden: 4, maxMembers: 1, seed: 1 });
    pool.addMember(rows(10, "pool"));
    const s = throughJson(pool.snapshot());
    (s.state.members[0] as { model: { state: { beta: number[] } } }).model.state.beta[1] = 1e300;
    expectLeewayError(() => AutoencoderPool.restore(s), "E_SNAPSHOT", "beta");
  });

  it("a snapshot whose P has a trace above the dtype's state range is refused", () => {
    const snapshot = throughJson(trained("float64", "sigmoid").snapshot());
    snapshot.state.p[0] = 1e301; // the first diagonal entry; P stays positive definite
    expectLeewayError(() => OselmAutoencoder.restore(snapshot), "E_SNAPSHOT", "trace");
  });

  it("fit on rows so large that β would leave the dtype's range is refused with E_STATE and keeps the state", () => {
    const model = trained("float64", "sigmoid");
    const before = JSON.stringify(model.snapshot());
    expectLeewayError(() => model.fit(rows(8, "fit").map((r) => r.map((v) => v * 1e200))), "E_STATE", "fit");
    expect(JSON.stringify(model.snapshot())).toBe(before);
  });
});

describe("AutoencoderPool: a refused sample leaves the whole state, the call counter included, as it was", () => {
  function pool(): AutoencoderPool {
    const p = new AutoencoderPool({ inputs: n, hidden: 4, maxMembers: 2, seed: 1 });
    p.addMember(rows(10, "a"));
    p.addMember(rows(10, "b").map((r) => r.map((v) => -v)));
    p.learn(rows(1, "c")[0] as Float64Array);
    return p;
  }
  it("bad types, a wrong length, a non-finite value, a bad member index and an overflowing input are refused with the snapshot unchanged", () => {
    const p = pool();
    const before = JSON.stringify(p.snapshot());
    const good = rows(1, "d")[0] as Float64Array;
    const huge = Float64Array.from(good, () => 1e300);
    const attempts: [() => unknown, string][] = [
      [() => p.score([1, 2, 3, "4", 5, 6] as never), "E_SAMPLE"],
      [() => p.learn([1, 2, 3, null, 5, 6] as never), "E_SAMPLE"],
      [() => p.score(new Float64Array(n + 1)), "E_DIMENSION"],
      [() => p.learn(Float64Array.from(good, (v, j) => (j === 1 ? Number.NaN : v))), "E_NON_FINITE"],
      [() => p.learn(good, 5), "E_OPTION"],
      [() => p.score(huge), "E_SAMPLE"],
      [() => p.learn(huge), "E_SAMPLE"],
      [() => p.learn(huge, 1), "E_SAMPLE"],
    ];
    for (const [attempt, code] of attempts) {
      expectLeewayError(attempt, code as never);
      expect(JSON.stringify(p.snapshot())).toBe(before);
    }
    // an accepted call counts once, as before
    p.score(good);
    expect(p.snapshot().state.calls).toBe(JSON.parse(before).state.calls + 1);
  });
});

describe("AutoencoderPool: members thawed from frozen models", () => {
  it("a pool whose only member is a frozen model added to it (none ever started) restores and continues bit for bit", () => {
    const source = new OselmAutoencoder({ inputs: n, hidden: 4, seed: "elsewhere" });
    source.fit(rows(10, "thawed"));
    const p = new AutoencoderPool({ inputs: n, hidden: 4, maxMembers: 2, seed: 1 });
    p.addMember(FrozenModel.from(source), "thawed");
    const copy = AutoencoderPool.restore(throughJson(p.snapshot()));
    for (const x of rows(5, "continue")) expect(copy.learn(x)).toEqual(p.learn(x));
    expect(JSON.stringify(copy.snapshot())).toBe(JSON.stringify(p.snapshot()));
  });
});
