import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { AutoencoderPool, FrozenModel, OselmAutoencoder, type AutoencoderPoolOptions } from "@leeway/pool";
import { expectLeewayError, throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";

const BINS = 256;
/** Log-magnitude spectrum shape of a family: a sloping noise floor and harmonics of a fundamental bin, decaying (invented). */
function familyMean(fundamental: number): Float64Array {
  const amplitude = new Float64Array(BINS);
  for (let b = 0; b < BINS; b++) amplitude[b] = 0.05 * Math.exp(-b / 200);
  for (let h = 1; h * fundamental < BINS; h++) {
    const centre = h * fundamental;
    for (let b = Math.max(0, centre - 2); b <= Math.min(BINS - 1, centre + 2); b++) amplitude[b] = (amplitude[b] as number) + (3 / h) * Math.exp(-((b - centre) ** 2));
  }
  return amplitude.map((a) => Math.log1p(10 * a));
}
const JITTER = 0.05; // sd of the additive log-domain noise per bin
const FUNDAMENTALS = { A: 9, B: 14, C: 23, D: 31 } as const;
type Family = keyof typeof FUNDAMENTALS;
const MEANS = Object.fromEntries(Object.entries(FUNDAMENTALS).map(([k, f]) => [k, familyMean(f)])) as Record<Family, Float64Array>;

function sample(family: Family, random: RandomSource): Float64Array {
  return Float64Array.from(MEANS[family], (m) => m + JITTER * random.normal());
}

function meanSquaredDistance(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let j = 0; j < a.length; j++) s += ((a[j] as number) - (b[j] as number)) ** 2;
  return s / a.length;
}

const FAMILIES: Family[] = ["A", "B", "C", "D"];
/** Between the within-family noise level and the nearest two families' distance (geometric mean), from the generator's own parameters. */
const SPAWN_LOSS = Math.sqrt(JITTER ** 2 * Math.min(...FAMILIES.flatMap((a) => FAMILIES.filter((b) => b !== a).map((b) => meanSquaredDistance(MEANS[a], MEANS[b])))));

const poolOptions: AutoencoderPoolOptions = { inputs: BINS, hidden: 32, maxMembers: 4, spawnLoss: SPAWN_LOSS, spawnPatience: 20, seed: "PS-2" };

/** Operating-mode blocks: A, B, C once each, then recurring blocks in a seeded order. */
function modeStream(seed: number): Family[] {
  const random = new RandomSource(seed);
  const modes: Family[] = [];
  for (const f of ["A", "B", "C"] as const) for (let i = 0; i < 120; i++) modes.push(f);
  for (let block = 0; block < 8; block++) {
    const f = (["A", "B", "C"] as const)[random.integer(3)] as Family;
    for (let i = 0; i < 40; i++) modes.push(f);
  }
  return modes;
}

describe("AutoencoderPool: specialization", () => {
  it("doc example: the empty pool starts member 0 and scores with it", () => {
    const pool = new AutoencoderPool({ inputs: 2, hidden: 3, maxMembers: 2, spawnPatience: 1, seed: 1 });
    expect(pool.learn(Float64Array.of(1, 0)).spawned).toBe(true);
    expect(pool.score(Float64Array.of(1, 0)).member).toBe(0);
  });

  it("on three well-separated spectrum families members specialize (purity ≥ 0.95) and a fourth family starts a new member", () => {
    const pool = new AutoencoderPool(poolOptions);
    const random = new RandomSource(21);
    const assigned: { family: Family; member: number }[] = [];
    let learnt = 0; // a spawning sample brings the whole run into the new member
    for (const family of modeStream(3)) {
      const reading = pool.learn(sample(family, random));
      if (reading.member >= 0) assigned.push({ family, member: reading.member });
      learnt += reading.spawned ? poolOptions.spawnPatience! : reading.member >= 0 ? 1 : 0;
    }
    expect(pool.size).toBe(3);
    const purity = (rows: { family: Family; member: number }[]): number => {
      let pure = 0;
      for (let m = 0; m < pool.size; m++) {
        const counts = FAMILIES.map((f) => rows.filter((r) => r.member === m && r.family === f).length);
        pure += Math.max(...counts);
      }
      return pure / rows.length;
    };
    expect(purity(assigned)).toBeGreaterThanOrEqual(0.95);
    // scoring alone also sends each family to one member
    const scored = FAMILIES.slice(0, 3).flatMap((family) => Array.from({ length: 30 }, () => ({ family, member: pool.score(sample(family, random)).member })));
    expect(purity(scored)).toBeGreaterThanOrEqual(0.95);
    expect(new Set(scored.map((r) => r.member)).size).toBe(3);

    let spawnedAt = -1;
    for (let i = 0; i < 60; i++) {
      const reading = pool.learn(sample("D", random));
      if (reading.spawned) spawnedAt = i;
      learnt += reading.spawned ? poolOptions.spawnPatience! : reading.member >= 0 ? 1 : 0;
    }
    expect(spawnedAt).toBe(poolOptions.spawnPatience! - 1);
    expect(pool.size).toBe(4);
    for (let i = 0; i < 20; i++) expect(pool.score(sample("D", random)).member).toBe(3);
    expect(pool.members.map((m) => m.learnt).reduce((a, b) => a + b, 0)).toBe(learnt);
  });

  it("a full pool lets the nearest member learn instead of starting one", () => {
    const pool = new AutoencoderPool({ ...poolOptions, maxMembers: 1 });
    const random = new RandomSource(4);
    for (let i = 0; i < 20; i++) pool.learn(sample("A", random));
    expect(pool.size).toBe(1);
    const reading = pool.learn(sample("B", random));
    expect(reading).toMatchObject({ member: 0, spawned: false, pending: 0 });
    expect(reading.loss).toBeGreaterThan(SPAWN_LOSS);
  });

  it("a sample below spawnLoss ends the run: its samples are dropped", () => {
    const pool = new AutoencoderPool(poolOptions);
    const random = new RandomSource(5);
    for (let i = 0; i < 20; i++) pool.learn(sample("A", random));
    for (let i = 0; i < 5; i++) expect(pool.learn(sample("B", random))).toMatchObject({ member: -1, pending: i + 1 });
    expect(pool.learn(sample("A", random))).toMatchObject({ member: 0, pending: 0 });
    expect(pool.pending).toBe(0);
  });
});

describe("AutoencoderPool: members", () => {
  it("score fills a reused buffer with every member's loss, equal to the member's own score", () => {
    const pool = new AutoencoderPool(poolOptions);
    const random = new RandomSource(6);
    pool.addMember(Array.from({ length: 30 }, () => sample("A", random)), "990 rpm");
    pool.addMember(Array.from({ length: 30 }, () => sample("B", random)), "1485 rpm");
    const x = sample("B", random);
    const first = pool.score(x);
    expect(first.member).toBe(1);
    expect(first.losses).toHaveLength(2);
    expect(first.losses[0]).toBe(pool.memberModel(0).score(x));
    expect(first.losses[1]).toBe(first.loss);
    const second = pool.score(sample("A", random));
    expect(second.losses).toBe(first.losses);
    expect(second.member).toBe(0);
    expect(pool.members.map((m) => m.label)).toEqual(["990 rpm", "1485 rpm"]);
    expect(pool.members.map((m) => m.nearest)).toEqual([1, 1]);
  });

  it("an empty pool scores member −1 with loss Infinity", () => {
    const pool = new AutoencoderPool(poolOptions);
    const reading = pool.score(new Float64Array(BINS));
    expect(reading.member).toBe(-1);
    expect(reading.loss).toBe(Infinity);
    expect(reading.losses).toHaveLength(0);
  });

  it("learn(x, member) trains the named member only", () => {
    const pool = new AutoencoderPool(poolOptions);
    const random = new RandomSource(7);
    pool.addMember(Array.from({ length: 30 }, () => sample("A", random)));
    pool.addMember(Array.from({ length: 30 }, () => sample("B", random)));
    const before = pool.memberModel(1).snapshot();
    pool.learn(sample("A", random), 0);
    expect(pool.memberModel(1).snapshot()).toEqual(before);
    expect(pool.members.map((m) => m.learnt)).toEqual([31, 30]);
    expectLeewayError(() => pool.learn(sample("A", random), 2), "E_OPTION", "member", "2");
  });

  it("freeze returns a copy that scores like the member but never learns", () => {
    const pool = new AutoencoderPool(poolOptions);
    const random = new RandomSource(8);
    pool.addMember(Array.from({ length: 30 }, () => sample("A", random)), "990 rpm");
    const frozen = pool.freeze(0);
    const x = sample("A", random);
    expect(frozen.score(x)).toBe(pool.score(x).loss);
    expect(frozen.label).toBe("990 rpm");
    expect("learn" in frozen).toBe(false);
    for (let i = 0; i < 50; i++) pool.learn(sample("C", random), 0);
    expect(frozen.score(x)).not.toBe(pool.score(x).loss);
    const again = FrozenModel.restore(throughJson(frozen.snapshot()));
    expect(again.score(x)).toBe(frozen.score(x));
    expect(again.label).toBe("990 rpm");
    expectRefusesCorruptions((s) => FrozenModel.restore(s), frozen.snapshot(), { sizePaths: [["model", "state", "inputs"]], numRuns: 40 });
  });

  it("addMember on a full pool is refused with E_STATE", () => {
    const pool = new AutoencoderPool({ ...poolOptions, maxMembers: 1 });
    pool.addMember([new Float64Array(BINS)]);
    expectLeewayError(() => pool.addMember([new Float64Array(BINS)]), "E_STATE", "full");
  });

  it("doc example: replaceMember swaps the only member of a full pool for one fitted on new rows", () => {
    const pool = new AutoencoderPool({ inputs: 2, hidden: 3, maxMembers: 1, seed: 1 });
    pool.addMember([Float64Array.of(1, 0), Float64Array.of(0.9, 0.1)], "low");
    expect(pool.replaceMember(0, [Float64Array.of(0, 1), Float64Array.of(0.1, 0.9)], "high")).toBe(0);
    expect([pool.size, pool.members[0]?.label]).toEqual([1, "high"]);
  });

  it("replaceMember fits a fresh member on the rows (equal to a new autoencoder from the next member seed), restarts its usage counts and leaves the others alone", () => {
    const pool = new AutoencoderPool({ ...poolOptions, hidden: 8, maxMembers: 2 });
    const random = new RandomSource(12);
    const rowsA = Array.from({ length: 30 }, () => sample("A", random));
    const rowsB = Array.from({ length: 30 }, () => sample("B", random));
    const rowsD = Array.from({ length: 30 }, () => sample("D", random));
    pool.addMember(rowsA, "990 rpm");
    pool.addMember(rowsB, "1485 rpm");
    for (let i = 0; i < 20; i++) pool.learn(sample("A", random));
    const before = pool.members;
    const xB = sample("B", random);
    const lossB = pool.score(xB).losses[1] as number;
    pool.replaceMember(0, rowsD, "2970 rpm");
    // members 0 and 1 were started from seeds .../member/0 and /1; the replacement is the third member ever started
    const expected = new OselmAutoencoder({ inputs: BINS, hidden: 8, seed: `${poolOptions.seed}/member/2` });
    expected.fit(rowsD);
    const xD = sample("D", random);
    expect(pool.score(xD).losses[0]).toBe(expected.score(xD));
    expect(pool.score(xD).member).toBe(0);
    expect(pool.score(xB).losses[1]).toBe(lossB);
    const after = pool.members;
    expect(after[0]).toMatchObject({ label: "2970 rpm", learnt: 30, nearest: 2 });
    expect(after[1]).toEqual({ ...before[1], nearest: (before[1] as { nearest: number }).nearest + 2, lastUsed: after[1]?.lastUsed });
    expect(pool.size).toBe(2);
  });

  it("replaceMember with a frozen model puts a learning copy of it in place, and leastRecentlyUsed names the member unused longest", () => {
    const pool = new AutoencoderPool({ ...poolOptions, hidden: 8, maxMembers: 2 });
    const random = new RandomSource(13);
    pool.addMember(Array.from({ length: 30 }, () => sample("A", random)), "990 rpm");
    pool.addMember(Array.from({ length: 30 }, () => sample("B", random)), "1485 rpm");
    const frozenA = pool.freeze(0);
    expect(pool.leastRecentlyUsed()).toBe(0); // both untouched since they were added: the one nearest less often, then the lower index
    for (let i = 0; i < 5; i++) pool.learn(sample("A", random));
    expect(pool.leastRecentlyUsed()).toBe(1);
    pool.replaceMember(0, Array.from({ length: 30 }, () => sample("C", random)));
    for (let i = 0; i < 5; i++) pool.learn(sample("C", random));
    expect(pool.leastRecentlyUsed()).toBe(1);
    pool.replaceMember(1, frozenA, "990 rpm");
    const x = sample("A", random);
    expect(pool.score(x).losses[1]).toBe(frozenA.score(x));
    pool.learn(x, 1);
    expect(pool.score(x).losses[1]).not.toBe(frozenA.score(x)); // the copy learns; the frozen model does not
    expect(pool.members[1]).toMatchObject({ label: "990 rpm", learnt: 31 }); // frozen after its 30 rows, plus the one just learnt
    // the pool after replacements restores bit for bit
    const copy = AutoencoderPool.restore(throughJson(pool.snapshot()));
    const y = sample("C", random);
    expect(Array.from(copy.score(y).losses)).toEqual(Array.from(pool.score(y).losses));
    expect(copy.members).toEqual(pool.members);
    expect(new AutoencoderPool({ ...poolOptions, maxMembers: 1 }).leastRecentlyUsed()).toBe(-1);
  });

  it("replaceMember refuses a bad member index, a bad label, and a frozen model with other member options", () => {
    const pool = new AutoencoderPool({ ...poolOptions, hidden: 8, maxMembers: 1 });
    const random = new RandomSource(14);
    const rows = Array.from({ length: 10 }, () => sample("A", random));
    expectLeewayError(() => pool.replaceMember(0, rows), "E_OPTION", "member", "empty");
    pool.addMember(rows);
    expectLeewayError(() => pool.replaceMember(1, rows), "E_OPTION", "member", "1");
    expectLeewayError(() => pool.replaceMember(0, rows, 5 as unknown as string), "E_OPTION", "label");
    expectLeewayError(() => pool.replaceMember(0, []), "E_OPTION", "rows");
    const other = new AutoencoderPool({ ...poolOptions, hidden: 8, maxMembers: 1, ridge: 0.1 });
    other.addMember(rows);
    expectLeewayError(() => pool.replaceMember(0, other.freeze(0)), "E_OPTION", "source", "ridge");
    const smaller = new AutoencoderPool({ ...poolOptions, hidden: 4, maxMembers: 1 });
    smaller.addMember(rows);
    expectLeewayError(() => pool.replaceMember(0, smaller.freeze(0)), "E_OPTION", "source", "hidden");
    // a refused replacement leaves the member as it was
    const x = sample("A", random);
    const kept = pool.score(x).loss;
    expect(pool.score(x).loss).toBe(kept);
    expect(pool.members[0]?.learnt).toBe(10);
  });

  it("stateBytes of a 256-32 float32 pool of 4 members is 147456 bytes", () => {
    const pool = new AutoencoderPool({ ...poolOptions, dtype: "float32" });
    const random = new RandomSource(9);
    for (const f of ["A", "B", "C", "D"] as const) pool.addMember(Array.from({ length: 5 }, () => sample(f, random)));
    expect(pool.stateBytes()).toBe(OselmAutoencoder.estimateBytes({ inputs: 256, hidden: 32, members: 4, dtype: "float32" }));
    expect(pool.stateBytes()).toBe(147456);
  });
});

describe("AutoencoderPool: snapshots", () => {
  function busyPool(): AutoencoderPool {
    const pool = new AutoencoderPool({ ...poolOptions, hidden: 8, spawnPatience: 5, forgetting: 0.999, dtype: "float32" });
    const random = new RandomSource(10);
    for (const f of ["A", "A", "B", "C"] as const) for (let i = 0; i < 8; i++) pool.learn(sample(f, random));
    pool.setLabel(0, "990 rpm");
    for (let i = 0; i < 3; i++) pool.learn(sample("D", random)); // a pending run
    return pool;
  }

  it("restore continues bit-identically, pending run included", () => {
    const pool = busyPool();
    expect(pool.pending).toBe(3);
    const copy = AutoencoderPool.restore(throughJson(pool.snapshot()));
    const random = new RandomSource(11);
    for (const f of ["D", "D", "A", "B", "C", "D"] as const) {
      const x = sample(f, random);
      expect(copy.learn(x)).toEqual(pool.learn(x));
      expect(Array.from(copy.score(x).losses)).toEqual(Array.from(pool.score(x).losses));
    }
    expect(copy.snapshot()).toEqual(pool.snapshot());
  });

  it("refuses corrupted snapshots, members that do not match the pool and absurd sizes", () => {
    const s = busyPool().snapshot();
    expectRefusesCorruptions((x) => AutoencoderPool.restore(x), s, {
      sizePaths: [["inputs"], ["hidden"], ["maxMembers"], ["spawnPatience"], ["members", 0, "model", "state", "inputs"]],
      variableLengthPaths: [["members"], ["pending"]],
      numRuns: 80,
    });
    const t = throughJson(s);
    t.state.members[1]!.model = throughJson(new AutoencoderPool({ ...poolOptions, hidden: 4 }).snapshot()).state.members[0]?.model ?? new OselmAutoencoder({ inputs: BINS, hidden: 4, seed: 1 }).snapshot();
    expectLeewayError(() => AutoencoderPool.restore(t), "E_SNAPSHOT", "members[1]");
    const u = throughJson(s);
    u.state.pending = [[1, 2, 3]];
    expectLeewayError(() => AutoencoderPool.restore(u), "E_SNAPSHOT", "pending[0]", "length 256");
    const v = throughJson(s);
    v.state.pending = Array.from({ length: 5 }, () => new Array(BINS).fill(0));
    expectLeewayError(() => AutoencoderPool.restore(v), "E_SNAPSHOT", "pending");
  });
});

describe("AutoencoderPool: bad input", () => {
  it("a wrong length is refused with E_DIMENSION naming expected and received, also on an empty pool", () => {
    const pool = new AutoencoderPool(poolOptions);
    expectLeewayError(() => pool.score(new Float64Array(255)), "E_DIMENSION", "length 256", "length 255");
    expectLeewayError(() => pool.learn(new Float64Array(257)), "E_DIMENSION", "length 256", "length 257");
  });

  it("non-finite samples are refused, or skipped and counted under nonFinite: skip", () => {
    const x = new Float64Array(BINS);
    x[3] = Number.NaN;
    expectLeewayError(() => new AutoencoderPool(poolOptions).learn(x), "E_NON_FINITE", "x[3]");
    expectLeewayError(() => new AutoencoderPool(poolOptions).score(x), "E_NON_FINITE", "x[3]");
    const skipping = new AutoencoderPool({ ...poolOptions, nonFinite: "skip" });
    expect(skipping.learn(x)).toMatchObject({ member: -1, skipped: 1, pending: 0 });
    expect(AutoencoderPool.restore(throughJson(skipping.snapshot())).skipped).toBe(1);
  });

  const bad: [string, Record<string, unknown>, string][] = [
    ["inputs", { inputs: 0 }, "0"],
    ["hidden", { hidden: -1 }, "-1"],
    ["maxMembers", { maxMembers: 0 }, "0"],
    ["maxMembers", { maxMembers: 65 }, "65"],
    ["spawnLoss", { spawnLoss: -1 }, "-1"],
    ["spawnPatience", { spawnPatience: 0 }, "0"],
    ["spawnPatience", { spawnPatience: 1, scaling: "standardize" }, "1"],
    ["seed", { seed: "" }, '""'],
    ["activation", { activation: "relu" }, '"relu"'],
    ["ridge", { ridge: 0 }, "0"],
    ["forgetting", { forgetting: 2 }, "2"],
    ["dtype", { dtype: "int8" }, '"int8"'],
    ["scaling", { scaling: "log" }, '"log"'],
    ["nonFinite", { nonFinite: "zero" }, '"zero"'],
    ["members", { members: 3 }, "not an option"],
  ];
  for (const [option, change, shown] of bad) {
    it(`option ${option} = ${shown} is refused with E_OPTION`, () => {
      expectLeewayError(() => new AutoencoderPool({ ...poolOptions, ...change } as AutoencoderPoolOptions), "E_OPTION", option, shown);
    });
  }
});
