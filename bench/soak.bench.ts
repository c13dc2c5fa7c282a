import { mkdirSync, writeFileSync } from "node:fs";
import { it } from "vitest";
import { LeewayError, RandomSource } from "@leeway/core";
import { OselmAutoencoder } from "@leeway/pool";
import { DecisionEngine } from "@leeway/policy";

// Long soak of the two components that run for ever on a device: the OS-ELM
// autoencoder (every dtype × activation) under adversarial spikes, and the
// decision engine on score streams with spikes, steps, creeping rises and
// operator calls. Counts what was accepted, refused (LeewayError, state kept)
// and crashed (any other throw), readings that were not finite, the longest run
// of refused ordinary rows (a model stuck for good shows up here), and checks
// every 10^5 steps that the snapshot restores and continues bit for bit.
// LEEWAY_SOAK_UPDATES (default 10^7) and LEEWAY_SOAK_STEPS (default 10^7)
// set the lengths. Writes bench/results/soak.json.
const UPDATES = Number(process.env.LEEWAY_SOAK_UPDATES ?? 1e7);
const STEPS = Number(process.env.LEEWAY_SOAK_STEPS ?? 1e7);
const CHECK_EVERY = 100_000;

interface SoakRow {
  name: string;
  steps: number;
  spikes: number;
  accepted: number;
  refused: number;
  refusedOrdinary: number;
  longestRefusedRun: number;
  crashed: number;
  nonFinite: number;
  restoreChecks: number;
  restoreFailures: number;
  firstProblem: string | null;
  cpuSeconds: number;
}

const rows: SoakRow[] = [];

function emptyRow(name: string): SoakRow {
  return { name, steps: 0, spikes: 0, accepted: 0, refused: 0, refusedOrdinary: 0, longestRefusedRun: 0, crashed: 0, nonFinite: 0, restoreChecks: 0, restoreFailures: 0, firstProblem: null, cpuSeconds: 0 };
}

function note(row: SoakRow, problem: string): void {
  if (row.firstProblem === null) row.firstProblem = `step ${row.steps}: ${problem}`;
}

/** A spike: 10^k with k uniform in [3, 300], either sign. */
function spike(rng: RandomSource): number {
  return (rng.next() < 0.5 ? -1 : 1) * 10 ** (3 + 297 * rng.next());
}

function soakAutoencoder(dtype: "float64" | "float32", activation: "sigmoid" | "tanh" | "identity"): SoakRow {
  const row = emptyRow(`OselmAutoencoder ${dtype} ${activation}`);
  const n = 16;
  const rng = new RandomSource(`soak/${dtype}/${activation}`);
  const model = new OselmAutoencoder({ inputs: n, hidden: 8, seed: 1, dtype, activation, forgetting: 0.99 });
  const x = new Float64Array(n);
  const ordinary = (): void => {
    for (let j = 0; j < n; j++) x[j] = rng.normal(0, 1);
  };
  const start = process.cpuUsage();
  let refusedRun = 0;
  for (let t = 0; t < UPDATES; t++) {
    row.steps = t;
    ordinary();
    const kind = rng.next();
    let adversarial = true;
    if (kind < 0.001) {
      x[rng.integer(n)] = spike(rng); // one huge element
      row.spikes++;
    } else if (kind < 0.0012) {
      x.fill(spike(rng)); // every element huge
      row.spikes++;
    } else if (kind < 0.0014) {
      x.fill(0); // an all-zero row
      row.spikes++;
    } else if (kind < 0.0016) {
      for (let j = 0; j < n; j++) x[j] = 1e6 + rng.normal(0, 1); // inputs near 10^6
      row.spikes++;
    } else adversarial = false;
    try {
      const loss = model.learn(x);
      row.accepted++;
      refusedRun = 0;
      if (!Number.isFinite(loss)) {
        row.nonFinite++;
        note(row, `learn returned ${loss}`);
      }
    } catch (error) {
      if (error instanceof LeewayError) {
        row.refused++;
        if (!adversarial) {
          row.refusedOrdinary++;
          refusedRun++;
          if (refusedRun > row.longestRefusedRun) row.longestRefusedRun = refusedRun;
        }
      } else {
        row.crashed++;
        note(row, `learn threw ${String(error)}`);
      }
    }
    if (t % CHECK_EVERY === CHECK_EVERY - 1) checkRestore(row, model, () => {
      ordinary();
      return x;
    });
  }
  row.steps = UPDATES;
  row.cpuSeconds = cpuSince(start);
  return row;
}

function checkRestore(row: SoakRow, model: OselmAutoencoder, nextRow: () => Float64Array): void {
  row.restoreChecks++;
  try {
    const twin = OselmAutoencoder.restore(JSON.parse(JSON.stringify(model.snapshot())));
    const probe = Float64Array.from(nextRow());
    const a = model.score(probe);
    const b = twin.score(probe);
    if (!Object.is(a, b) || !Number.isFinite(a)) throw new Error(`restored copy scored ${b}, the original ${a}`);
  } catch (error) {
    row.restoreFailures++;
    note(row, `restore check: ${String(error)}`);
  }
}

/** One engine step with the host's operator calls, all drawn beforehand so that a twin can take the same. */
function engineStep(engine: DecisionEngine, live: number, acknowledge: boolean, confirm: boolean): unknown {
  const d = engine.observeScores(live, [live * 1.02]);
  if (d.action === "retrain") engine.modelReplaced();
  if (engine.phase === "latched" && acknowledge) engine.acknowledge();
  if (engine.awaitingConfirmation) {
    if (confirm) engine.confirmRetrain();
    else engine.rejectRetrain();
  }
  return d;
}

function soakEngine(): SoakRow {
  const row = emptyRow("DecisionEngine scores");
  const rng = new RandomSource("soak/engine");
  const engine = new DecisionEngine({ seed: 1, retrain: "auto" });
  const start = process.cpuUsage();
  let level = 1;
  let creep = 0;
  let twin: DecisionEngine | null = null;
  let twinSteps = 0;
  for (let t = 0; t < STEPS; t++) {
    row.steps = t;
    const u = rng.next();
    if (u < 1e-5) level *= 2 ** rng.normal(0, 1); // a lasting step (concept drift)
    if (u > 1 - 2e-6) creep = 1e-5; // a slow rise starts (degradation)
    if (u > 0.3 && u < 0.30002) creep = 0; // ... and ends with a repair
    level *= 1 + creep;
    if (level > 1e6 || level < 1e-6) level = 1;
    let live = level * Math.exp(rng.normal(0, 0.1));
    if (rng.next() < 0.001) {
      live = Math.abs(spike(rng));
      row.spikes++;
    }
    const acknowledge = rng.next() < 0.01;
    const confirm = rng.next() < 0.5;
    let decision: unknown;
    try {
      decision = engineStep(engine, live, acknowledge, confirm);
      row.accepted++;
      if (hasNonFinite(decision)) {
        row.nonFinite++;
        note(row, `decision with a non-finite number: ${JSON.stringify(decision).slice(0, 200)}`);
      }
    } catch (error) {
      if (error instanceof LeewayError) row.refused++;
      else {
        row.crashed++;
        note(row, `threw ${String(error)}`);
      }
    }
    if (twin !== null) {
      // the restored twin takes the same ten samples and must decide the same
      try {
        const other = engineStep(twin, live, acknowledge, confirm);
        if (JSON.stringify(other) !== JSON.stringify(decision)) throw new Error("the restored engine decided differently");
        if (++twinSteps === 10) {
          if (JSON.stringify(twin.snapshot()) !== JSON.stringify(engine.snapshot())) throw new Error("the restored engine's state differs after ten samples");
          twin = null;
        }
      } catch (error) {
        row.restoreFailures++;
        note(row, `restore check: ${String(error)}`);
        twin = null;
      }
    }
    if (t % CHECK_EVERY === CHECK_EVERY - 1) {
      row.restoreChecks++;
      try {
        twin = DecisionEngine.restore(JSON.parse(JSON.stringify(engine.snapshot())));
        twinSteps = 0;
      } catch (error) {
        row.restoreFailures++;
        note(row, `restore: ${String(error)}`);
      }
    }
  }
  row.steps = STEPS;
  row.cpuSeconds = cpuSince(start);
  return row;
}

function hasNonFinite(value: unknown): boolean {
  if (typeof value === "number") return !Number.isFinite(value);
  if (typeof value === "object" && value !== null) return Object.values(value).some(hasNonFinite);
  return false;
}

function cpuSince(start: NodeJS.CpuUsage): number {
  const used = process.cpuUsage(start);
  return (used.user + used.system) / 1e6;
}

function print(row: SoakRow): void {
  console.log(
    `${row.name.padEnd(34)} steps ${row.steps}  spikes ${row.spikes}  accepted ${row.accepted}  refused ${row.refused} (ordinary ${row.refusedOrdinary}, longest run ${row.longestRefusedRun})  crashed ${row.crashed}  non-finite ${row.nonFinite}  restore ${row.restoreChecks - row.restoreFailures}/${row.restoreChecks}  cpu ${row.cpuSeconds.toFixed(1)} s${row.firstProblem ? `\n    first problem: ${row.firstProblem}` : ""}`,
  );
}

for (const dtype of ["float64", "float32"] as const) {
  for (const activation of ["sigmoid", "tanh", "identity"] as const) {
    it(`soak: ${UPDATES} autoencoder updates with spikes, ${dtype} ${activation}`, () => {
      const row = soakAutoencoder(dtype, activation);
      rows.push(row);
      print(row);
    });
  }
}

it(`soak: ${STEPS} decision engine steps on scores with spikes, steps, rises and operator calls`, () => {
  const row = soakEngine();
  rows.push(row);
  print(row);
  mkdirSync("bench/results", { recursive: true });
  writeFileSync("bench/results/soak.json", `${JSON.stringify({ updates: UPDATES, steps: STEPS, rows }, null, 1)}\n`);
});
