import { describe, expect, it } from "vitest";
import { FrozenModel, OselmAutoencoder } from "@leeway/pool";
import { expectLeewayError, throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";

describe("FrozenModel", () => {
  it("doc example: a frozen copy scores like the model it was made from", () => {
    const live = new OselmAutoencoder({ inputs: 2, hidden: 3, seed: 1 });
    live.learn(Float64Array.of(0.5, 0.5));
    const reference = FrozenModel.from(live, "commissioning");
    expect(reference.score(Float64Array.of(0.5, 0.5)) === live.score(Float64Array.of(0.5, 0.5))).toBe(true);
  });

  it("does not follow later learning of the original, and thaw gives an independent learning copy", () => {
    const live = new OselmAutoencoder({ inputs: 2, hidden: 3, seed: 1 });
    live.learn(Float64Array.of(0.5, 0.5));
    const frozen = FrozenModel.from(live);
    const x = Float64Array.of(2, -1);
    const before = frozen.score(x);
    live.learn(x);
    expect(frozen.score(x)).toBe(before);
    const thawed = frozen.thaw();
    thawed.learn(x);
    expect(frozen.score(x)).toBe(before);
    expect(thawed.score(x)).toBe(live.score(x));
    expect(frozen.count).toBe(1);
    expect(frozen.label).toBeNull();
    expect(frozen.stateBytes()).toBe(live.stateBytes());
  });

  it("restores from its snapshot with label and scores bit-identically; corrupted snapshots are refused", () => {
    const live = new OselmAutoencoder({ inputs: 3, hidden: 2, seed: "PS-2", dtype: "float32" });
    for (let i = 0; i < 5; i++) live.learn(Float64Array.of(i, 1, -i));
    const frozen = FrozenModel.from(live, "1485 rpm");
    const copy = FrozenModel.restore(throughJson(frozen.snapshot()));
    expect(copy.label).toBe("1485 rpm");
    expect(copy.score(Float64Array.of(1, 2, 3))).toBe(frozen.score(Float64Array.of(1, 2, 3)));
    expect(Array.from(copy.reconstruct(Float64Array.of(1, 2, 3)))).toEqual(Array.from(frozen.reconstruct(Float64Array.of(1, 2, 3))));
    expectRefusesCorruptions((s) => FrozenModel.restore(s), frozen.snapshot(), { sizePaths: [["model", "state", "inputs"], ["model", "state", "hidden"]], numRuns: 60 });
    expectLeewayError(() => copy.score(Float64Array.of(1)), "E_DIMENSION", "length 3", "length 1");
  });
});
