import { it } from "vitest";
import { LeewayError, RandomSource } from "@leeway/core";
import { AutoencoderPool, OselmAutoencoder } from "@leeway/pool";

// Reliability probes of the autoencoder and the pool: streams and snapshots that
// once killed a model or were accepted wrongly. Each probe class counts what it
// tried, what was refused with a LeewayError, what was accepted wrongly (a
// non-finite reading, a model that can no longer learn or restore, a corrupted
// snapshot taken in) and what crashed (anything thrown that is not a LeewayError).
// Run: npm run bench -- bench/pool-probes.bench.ts (figures in docs/pool.md).

interface Tally { tried: number; refused: number; acceptedWrongly: number; crashed: number; note: string }

function tally(): Tally {
  return { tried: 0, refused: 0, acceptedWrongly: 0, crashed: 0, note: "" };
}

/** Runs one attempt: true when it returned, false when refused by a LeewayError. */
function attempt(t: Tally, run: () => void): boolean {
  t.tried++;
  try {
    run();
    return true;
  } catch (error) {
    if (error instanceof LeewayError) t.refused++;
    else t.crashed++;
    return false;
  }
}

function restorable(model: OselmAutoencoder): boolean {
  try {
    OselmAutoencoder.restore(JSON.parse(JSON.stringify(model.snapshot())));
    return true;
  } catch {
    return false;
  }
}

const UPDATES = 20_000;

it("pool reliability probes", () => {
  const results: Record<string, Tally> = {};

  // 1. float32 spike: 50 normal rows, one row with x[3] = 1e45, then normal rows again
  {
    const t = tally();
    const random = new RandomSource(1);
    const model = new OselmAutoencoder({ inputs: 16, hidden: 8, seed: 1, dtype: "float32", forgetting: 0.99 });
    const row = (): Float64Array => random.fillNormal(new Float64Array(16));
    for (let i = 0; i < 50; i++) model.learn(row());
    const spike = row();
    spike[3] = 1e45;
    let spikeAccepted = false;
    attempt(t, () => {
      const loss = model.learn(spike);
      spikeAccepted = true;
      if (!Number.isFinite(loss)) t.acceptedWrongly++;
    });
    let broken = 0;
    for (let i = 0; i < 1000; i++) {
      attempt(t, () => {
        const loss = model.learn(row());
        if (!Number.isFinite(loss)) broken++;
      });
    }
    if (!restorable(model) || !model.health().finite) t.acceptedWrongly++;
    t.acceptedWrongly += t.refused > (spikeAccepted ? 0 : 1) ? 1 : 0; // normal rows refused after the spike: frozen
    t.note = `spike ${spikeAccepted ? "accepted" : "refused"}; ${broken} non-finite losses after it; restorable ${restorable(model)}; refused later ${t.refused - (spikeAccepted ? 0 : 1)}`;
    results["float32 spike 1e45"] = t;
  }

  // 2. float32, identity, forgetting 0.999, inputs near 1e6
  {
    const t = tally();
    const random = new RandomSource(2);
    const model = new OselmAutoencoder({ inputs: 16, hidden: 8, seed: 2, dtype: "float32", activation: "identity", forgetting: 0.999 });
    const base = random.fillNormal(new Float64Array(16), 1e6, 1e4);
    let accepted = 0;
    for (let i = 0; i < UPDATES; i++) {
      const x = Float64Array.from(base, (v) => v + 1e3 * random.normal());
      if (attempt(t, () => model.learn(x))) accepted++;
    }
    const tail = model.health();
    if (t.refused > UPDATES / 2) t.acceptedWrongly++; // frozen for good
    t.note = `accepted ${accepted}; health ok ${tail.ok}; restorable ${restorable(model)}`;
    results["float32 identity inputs ~1e6"] = t;
  }

  // 3. float64, identity, forgetting 0.99: one row with an entry of 1e150 among N(0,1) rows
  {
    const t = tally();
    const random = new RandomSource(3);
    const model = new OselmAutoencoder({ inputs: 16, hidden: 8, seed: 3, activation: "identity", forgetting: 0.99 });
    for (let i = 0; i < 100; i++) model.learn(random.fillNormal(new Float64Array(16)));
    const spike = random.fillNormal(new Float64Array(16));
    spike[1] = 1e150;
    attempt(t, () => model.learn(spike));
    const refusedBefore = t.refused;
    let accepted = 0;
    for (let i = 0; i < UPDATES; i++) if (attempt(t, () => model.learn(random.fillNormal(new Float64Array(16))))) accepted++;
    if (t.refused - refusedBefore > UPDATES / 2) t.acceptedWrongly++;
    t.note = `spike ${refusedBefore === 0 ? "accepted" : "refused"}; later rows accepted ${accepted}; health ok ${model.health().ok}`;
    results["float64 identity spike 1e150"] = t;
  }

  // 4. restore of a snapshot whose P is symmetric with a positive diagonal but not positive definite
  {
    const t = tally();
    const random = new RandomSource(4);
    const model = new OselmAutoencoder({ inputs: 16, hidden: 8, seed: 4 });
    model.fit(Array.from({ length: 40 }, () => random.fillNormal(new Float64Array(16))));
    const snap = JSON.parse(JSON.stringify(model.snapshot()));
    snap.state.p[1] = 1e3;
    let restored: OselmAutoencoder | null = null;
    attempt(t, () => {
      restored = OselmAutoencoder.restore(snap);
    });
    if (restored !== null) {
      t.acceptedWrongly++;
      let throws = 0;
      for (let i = 0; i < 200; i++) if (!attempt(t, () => (restored as unknown as OselmAutoencoder).learn(random.fillNormal(new Float64Array(16))))) throws++;
      t.note = `indefinite P accepted; ${throws} of 200 later learns refused`;
    } else t.note = "indefinite P refused";
    results["restore: indefinite P"] = t;
  }

  // 5. pool snapshot with an empty member list while spawned says 1
  {
    const t = tally();
    const pool = new AutoencoderPool({ inputs: 4, hidden: 3, maxMembers: 2, seed: 5, spawnPatience: 3 });
    const random = new RandomSource(5);
    for (let i = 0; i < 3; i++) pool.learn(random.fillNormal(new Float64Array(4)));
    const snap = JSON.parse(JSON.stringify(pool.snapshot()));
    snap.state.members = [];
    let restored: AutoencoderPool | null = null;
    attempt(t, () => {
      restored = AutoencoderPool.restore(snap);
    });
    if (restored !== null) t.acceptedWrongly++;
    t.note = restored === null ? "refused" : "accepted";
    results["restore: pool members empty, count 1"] = t;
  }

  // 6. identity activation, all-zero input
  {
    const t = tally();
    const model = new OselmAutoencoder({ inputs: 4, hidden: 3, seed: 6, activation: "identity" });
    let message = "";
    attempt(t, () => {
      try {
        model.learn(new Float64Array(4));
      } catch (error) {
        message = (error as Error).message;
        throw error;
      }
    });
    if (t.refused === 1 && !/hidden/.test(message)) t.acceptedWrongly++; // refused, but for the wrong reason
    t.note = message;
    results["identity all-zero input"] = t;
  }

  // 7. non-numbers in score and learn
  {
    const t = tally();
    const model = new OselmAutoencoder({ inputs: 2, hidden: 3, seed: 7 });
    const pool = new AutoencoderPool({ inputs: 2, hidden: 3, maxMembers: 1, seed: 7, spawnPatience: 1 });
    pool.learn([1, 2]);
    const bad: unknown[] = [[1, "2"], [null, 1], [[7], 1], [true, 1], [1n, 1], [{}, 1], ["1e3", 0]];
    for (const x of bad) {
      for (const run of [() => model.score(x as number[]), () => model.learn(x as number[]), () => pool.score(x as number[]), () => pool.learn(x as number[])]) {
        if (attempt(t, run)) t.acceptedWrongly++;
      }
    }
    results["non-numbers in score/learn"] = t;
  }

  console.log("\nprobe class                              tried  refused  accepted-wrongly  crashed  note");
  for (const [name, t] of Object.entries(results)) {
    console.log(`${name.padEnd(40)} ${String(t.tried).padStart(5)} ${String(t.refused).padStart(8)} ${String(t.acceptedWrongly).padStart(17)} ${String(t.crashed).padStart(8)}  ${t.note}`);
  }
});
