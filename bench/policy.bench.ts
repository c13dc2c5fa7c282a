import { it } from "vitest";
import { DecisionEngine } from "@leeway/policy";
import { collect, stationaryNull } from "@leeway/sim";
import { BenchReport, consume, nsPerOp, sumBaselineNs } from "./harness.js";

// Timing reads the clock (process.hrtime), which only bench files may do.

it("policy: decision engine", () => {
  const report = new BenchReport("policy");
  const { spectra } = collect(stationaryNull({ length: 2400, seed: 7 }));
  const flat = new Float64Array(256 * 512);
  for (let i = 0; i < 512; i++) flat.set(spectra[1800 + i] as Float64Array, 256 * i);
  const baseline = sumBaselineNs(flat);

  // Feature mode with the default pool (256-32-256, 4 members): commission, then give the pool its
  // other three members (as three retrains would) so that every sample is scored by four.
  const engine = new DecisionEngine({ inputs: 256, seed: 1 });
  for (let i = 0; i < 1200; i++) engine.observe(spectra[i] as Float64Array);
  const pool = engine.model?.pool;
  if (pool === undefined) throw new Error("feature mode expected");
  for (let m = 0; m < 3; m++) pool.addMember(spectra.slice(1200 + 100 * m, 1300 + 100 * m), `mode-${m}`);
  const window = spectra.slice(1800, 2312);
  const twin = DecisionEngine.restore(JSON.parse(JSON.stringify(engine.snapshot())));
  const twinPool = twin.model?.pool;
  const twinReference = twin.model?.reference(0);
  if (twinPool === undefined || twinReference === undefined) throw new Error("feature mode expected");

  const actions: Record<string, number> = {};
  const observeAll = (): void => {
    for (const x of window) {
      const d = engine.observe(x);
      actions[d.action] = (actions[d.action] ?? 0) + 1;
    }
  };
  // The same model work without the engine: score by every member, learn by the nearest, score by the reference.
  const modelAll = (): void => {
    let s = 0;
    for (const x of window) {
      const scored = twinPool.score(x);
      twinPool.learn(x, scored.member);
      s += twinReference.score(x);
    }
    consume(s);
  };
  // Paired, interleaved timing (the machine is shared and noisy): 15 rounds of one pass each, the
  // median of the per-round ratios.
  observeAll();
  modelAll();
  const ratios: number[] = [];
  const engineTimes: number[] = [];
  const modelTimes: number[] = [];
  for (let round = 0; round < 15; round++) {
    const t0 = process.hrtime.bigint();
    observeAll();
    const t1 = process.hrtime.bigint();
    modelAll();
    const t2 = process.hrtime.bigint();
    engineTimes.push(Number(t1 - t0) / window.length);
    modelTimes.push(Number(t2 - t1) / window.length);
    ratios.push(Number(t1 - t0) / Number(t2 - t1) - 1);
  }
  const median = (xs: number[]): number => [...xs].sort((a, b) => a - b)[xs.length >> 1] as number;
  const engineNs = median(engineTimes);
  const modelNs = median(modelTimes);
  report.add("feature mode: observe (256-32-256 × 4, 1 reference)", engineNs, baseline, `${(1e9 / engineNs).toFixed(0)} decisions/s; actions ${JSON.stringify(actions)}`);
  report.add("feature mode: model work alone (score 4, learn 1, reference 1)", modelNs, baseline, `${(1e9 / modelNs).toFixed(0)} samples/s`);
  report.add("feature mode: engine's own cost / model work (paired rounds, median)", median(ratios) * modelNs, modelNs, "target ≤ 0.10");

  // Score-only mode: scores of a host's model, live and one reference.
  const live = new Float64Array(1 << 14);
  const ref = new Float64Array(1 << 14);
  for (let i = 0; i < live.length; i++) {
    live[i] = 0.02 * Math.exp(0.2 * Math.sin(i * 12.9898) * Math.cos(i * 78.233));
    ref[i] = live[i] as number;
  }
  const scores = new DecisionEngine({ seed: 1 });
  for (let i = 0; i < 1200; i++) scores.observeScores(live[i] as number, [ref[i] as number]);
  const refs = [0];
  const scoreNs = nsPerOp(() => {
    let s = 0;
    for (let i = 0; i < live.length; i++) {
      refs[0] = ref[i] as number;
      s += scores.observeScores(live[i] as number, refs).index;
    }
    consume(s);
  }, live.length);
  report.add("score-only mode: observeScores (live + 1 reference)", scoreNs, sumBaselineNs(live), `${(1e9 / scoreNs).toFixed(0)} decisions/s`);
  report.add("the decision core's cost / feature-mode model work", scoreNs, modelNs, "the core is the same in both modes");
  report.write();
});
