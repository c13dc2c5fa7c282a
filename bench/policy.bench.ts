import { it } from "vitest";
import { DecisionEngine } from "@leeway/policy";
import { collect, stationaryNull } from "@leeway/sim";
import { BenchReport, consume, nsPerOp, sumBaselineNs } from "./harness.js";
import { interleave, ratio, show, spread, type Spread, type Timing } from "./pool-timing.js";

// Timing reads the clocks (process.hrtime, process.cpuUsage), which only bench files may do.
// Baselines: feature mode's engine is measured against the same model work done alone (every
// member scores, the nearest learns the scored sample, the reference scores), with no forward pass
// repeated in either; the other rows against a loop that only sums a Float64Array.

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
  const twin2 = DecisionEngine.restore(JSON.parse(JSON.stringify(engine.snapshot())));
  if (twinPool === undefined || twinReference === undefined) throw new Error("feature mode expected");

  const actions: Record<string, number> = {};
  const observeAll = (): void => {
    for (const x of window) {
      const d = engine.observe(x);
      actions[d.action] = (actions[d.action] ?? 0) + 1;
    }
  };
  // The same model work without the engine, with no step done twice: score by every member, the
  // nearest learns the scored sample (learnScored reuses the forward pass, as the engine does), score
  // by the reference. This is the baseline of the engine's own cost.
  const modelAll = (): void => {
    let s = 0;
    for (const x of window) {
      const scored = twinPool.score(x);
      twinPool.learnScored(scored.member);
      s += twinReference.score(x);
    }
    consume(s);
  };
  // The model work as the engine did it before it reused the forward pass: learn(x, member) runs the
  // nearest member's forward pass a second time. Shown to size the repeat, not as a baseline.
  const repeatPool = twin2.model?.pool;
  const repeatReference = twin2.model?.reference(0);
  if (repeatPool === undefined || repeatReference === undefined) throw new Error("feature mode expected");
  const repeatAll = (): void => {
    let s = 0;
    for (const x of window) {
      const scored = repeatPool.score(x);
      repeatPool.learn(x, scored.member);
      s += repeatReference.score(x);
    }
    consume(s);
  };
  // Interleaved rounds (the machine is shared and noisy), by process CPU time and by wall time;
  // each ratio is taken per round and shown as min / median / max.
  const times = interleave({ engine: { run: observeAll, ops: window.length }, model: { run: modelAll, ops: window.length }, repeat: { run: repeatAll, ops: window.length } }, 11, 150);
  const T = (name: string): Timing[] => times[name] as Timing[];
  const cpu = (name: string): Spread => spread(T(name).map((t) => t.cpu));
  const minus1 = (s: Spread): Spread => ({ min: s.min - 1, median: s.median - 1, max: s.max - 1 });
  const engineNs = cpu("engine").median;
  const modelNs = cpu("model").median;
  const shown = (name: string): string => `CPU ns ${show(cpu(name), 0)}, wall ns ${show(spread(T(name).map((t) => t.wall)), 0)}`;
  report.add("feature mode: observe (256-32-256 × 4, 1 reference)", engineNs, baseline, `${(1e9 / engineNs).toFixed(0)} decisions per CPU s; ${shown("engine")}; actions ${JSON.stringify(actions)}`);
  report.add("feature mode: model work alone (score 4, learnScored 1, reference 1)", modelNs, baseline, `${(1e9 / modelNs).toFixed(0)} samples per CPU s; ${shown("model")}`);
  report.add("feature mode: engine's own cost / model work alone", engineNs - modelNs, modelNs, `per round (CPU) ${show(minus1(ratio(T("engine"), T("model"), "cpu")), 3)}, (wall) ${show(minus1(ratio(T("engine"), T("model"), "wall")), 3)}; target ≤ 0.05`);
  report.add("feature mode: model work with a repeated forward pass (learn(x, m)) / without", cpu("repeat").median, modelNs, `per round (CPU) ${show(ratio(T("repeat"), T("model"), "cpu"), 3)}; ${shown("repeat")}`);

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
