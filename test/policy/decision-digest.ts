import { createHash } from "node:crypto";
import { RandomSource } from "@leeway/core";
import { DecisionEngine, ModeRouter, ScriptedOperator, type Decision } from "@leeway/policy";
import { collect, harbourLane } from "@leeway/sim";
import { demoEngineOptions } from "../../packages/cli/src/commands/demo.js";

/**
 * Digests of whole decision logs (SHA-256 of one JSON line per decision), so
 * that a refactoring of the engine can show it decides exactly as before.
 * The digests live in test/policy/fixtures/*.digest.json; regenerate them
 * with `npx vitest run test/policy/decision-digest.test.ts -u` only when the
 * decisions are meant to change, and say why in the commit.
 */
export function digestOf(decisions: Iterable<Decision>): { samples: number; sha256: string } {
  const hash = createHash("sha256");
  let samples = 0;
  for (const d of decisions) {
    hash.update(JSON.stringify(d));
    hash.update("\n");
    samples += 1;
  }
  return { samples, sha256: hash.digest("hex") };
}

/** The demo's scenario and engines (one feature-mode engine per speed, the demo's scripted operator) at `scale` samples per simulated hour. */
export function demoDecisions(scale: number): Decision[] {
  const { spectra, truth } = collect(harbourLane({ scale, seed: "harbour-lane" }));
  const router = new ModeRouter((mode) => new DecisionEngine(demoEngineOptions(scale, 256, `harbour-lane/${mode}`)), { acknowledgeAfter: 4, confirmAfter: 4 });
  return spectra.map((x, i) => router.observe(x, (truth[i] as { mode: string }).mode));
}

/**
 * A score-only engine through a drift, a clog and a slow rise, with an
 * operator that acknowledges after 7 samples and confirms after 5 and a host
 * that replaces its model when told to retrain (invented lognormal losses
 * around 0.07).
 */
export function scoreOnlyDecisions(): Decision[] {
  const engine = new DecisionEngine({ commissioning: 200, calibration: 100, targetArl0: 1000, calibrationReplicates: 20, settling: 80, settlingLimit: 500, trendBlock: 5, trendWindow: 60, trendMinBlocks: 12, coolDown: 100, seed: "digest" });
  const operator = new ScriptedOperator(engine, { acknowledgeAfter: 7, confirmAfter: 5 });
  const rng = new RandomSource("digest-stream");
  const out: Decision[] = [];
  let retrained = false;
  for (let i = 0; i < 6000; i++) {
    let level = 0.07;
    if (i >= 1500) level *= 1.8; // a new noise floor
    if (i >= 3500) level *= Math.exp((i - 3500) / 1500); // a slow rise
    if (i >= 2600 && i < 2640) level *= 6; // a clog
    const live = level * Math.exp(0.1 * rng.normal());
    const reference = live * Math.exp(0.05 * rng.normal()) * (i >= 1500 ? 1.3 : 1);
    const d = engine.observeScores(live, retrained ? [reference, live * 1.1] : [reference]);
    operator.after(d);
    if (d.action === "retrain") {
      engine.modelReplaced(); // the host's new model serves from the next sample
      retrained = true;
    }
    out.push(d);
  }
  return out;
}

/**
 * A feature-mode engine (8 inputs) through a change of operating pattern, a
 * return to the first pattern and back again, with a scripted operator that
 * acknowledges after 5 samples and confirms after 3 (invented feature rows).
 */
export function featureDecisions(): Decision[] {
  const engine = new DecisionEngine({ inputs: 8, hidden: 6, members: 2, commissioning: 120, calibration: 80, targetArl0: 800, calibrationReplicates: 20, settling: 60, settlingLimit: 400, trendBlock: 5, trendWindow: 40, trendMinBlocks: 10, coolDown: 60, seed: "digest-features" });
  const operator = new ScriptedOperator(engine, { acknowledgeAfter: 5, confirmAfter: 3 });
  const rng = new RandomSource("digest-feature-stream");
  const out: Decision[] = [];
  for (let i = 0; i < 3000; i++) {
    const second = (i >= 800 && i < 1600) || i >= 2300;
    const x = new Float64Array(8);
    for (let j = 0; j < 8; j++) x[j] = (second ? 1 + 0.5 * Math.cos(j) : 1 + 0.3 * Math.sin(j)) + 0.02 * rng.normal();
    const d = engine.observe(x);
    operator.after(d);
    out.push(d);
  }
  return out;
}
