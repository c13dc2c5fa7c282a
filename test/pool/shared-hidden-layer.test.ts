import { describe, expect, it } from "vitest";
import { RandomSource, type Snapshot } from "@leeway/core";
import { AutoencoderPool, FrozenModel, OselmAutoencoder, type AutoencoderPoolState } from "@leeway/pool";
import { expectLeewayError, throughJson } from "../support/errors.js";

const n = 12;

function rows(seed: number, count: number, level: number): Float64Array[] {
  const random = new RandomSource(seed);
  return Array.from({ length: count }, () => random.fillNormal(new Float64Array(n), level, 0.2));
}

function sharedPool(): AutoencoderPool {
  const pool = new AutoencoderPool({ inputs: n, hidden: 6, maxMembers: 3, seed: "PS-2", sharedHiddenLayer: true });
  pool.addMember(rows(1, 20, 0), "990 rpm");
  pool.addMember(rows(2, 20, 1), "1485 rpm");
  pool.addMember(rows(3, 20, 2), "2970 rpm");
  return pool;
}

describe("AutoencoderPool with sharedHiddenLayer", () => {
  it("every member's loss equals its own model's score bit for bit, and all members hold one hidden layer", () => {
    const pool = sharedPool();
    const checksums = [0, 1, 2].map((m) => pool.memberModel(m).hiddenLayer().checksum);
    expect(new Set(checksums).size).toBe(1);
    for (const x of rows(4, 30, 1)) {
      const losses = Float64Array.from(pool.score(x).losses);
      for (let m = 0; m < 3; m++) expect(losses[m]).toBe(pool.memberModel(m).score(x));
    }
  });

  it("learning through the pool equals learning the nearest member directly, and a snapshot continues bit for bit", () => {
    const pool = sharedPool();
    const stream = rows(5, 60, 1);
    for (const x of stream.slice(0, 30)) {
      const nearest = pool.score(x).member;
      const direct = pool.memberModel(nearest);
      const expected = direct.learn(x);
      const reading = pool.learn(x);
      expect(reading).toMatchObject({ member: nearest, loss: expected });
      expect(pool.memberModel(nearest).outputWeights()).toEqual(direct.outputWeights());
    }
    const copy = AutoencoderPool.restore(throughJson(pool.snapshot()));
    for (const x of stream.slice(30)) expect(copy.learn(x)).toEqual(pool.learn(x));
  });

  it('is refused with "standardize" scaling, a frozen model of another hidden layer, and in a snapshot whose member has its own seed', () => {
    expectLeewayError(
      () => new AutoencoderPool({ inputs: n, hidden: 6, maxMembers: 2, seed: 1, sharedHiddenLayer: true, scaling: "standardize" }),
      "E_OPTION", "scaling", "sharedHiddenLayer");
    expectLeewayError(() => new AutoencoderPool({ inputs: n, hidden: 6, maxMembers: 2, seed: 1, sharedHiddenLayer: "yes" as unknown as boolean }), "E_OPTION", "sharedHiddenLayer");
    const pool = new AutoencoderPool({ inputs: n, hidden: 6, maxMembers: 2, seed: "PS-2", sharedHiddenLayer: true });
    pool.addMember(rows(1, 20, 0));
    const other = new OselmAutoencoder({ inputs: n, hidden: 6, seed: "elsewhere" });
    other.fit(rows(6, 20, 0));
    expectLeewayError(() => pool.addMember(FrozenModel.from(other)), "E_OPTION", "shared");
    const s = throughJson(pool.snapshot()) as Snapshot<AutoencoderPoolState>;
    const own = throughJson(other.snapshot());
    (s.state.members[0] as { model: unknown }).model = own;
    expectLeewayError(() => AutoencoderPool.restore(s), "E_SNAPSHOT", "members[0]");
  });
});
