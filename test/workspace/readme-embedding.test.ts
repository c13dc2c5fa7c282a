import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import ts from "typescript";
import { describe, expect, it } from "vitest";
import * as policy from "@leeway/policy";
import { RandomSource } from "@leeway/core";
import type { Decision } from "@leeway/policy";

// The README's embedding example, run as written (types stripped by the TypeScript compiler) with
// stand-in models, in both attendance modes: a score stream that stays normal, jumps for a while and
// returns. After the event the model must learn again, and the event must page once.
const readme = readFileSync(fileURLToPath(new URL("../../README.md", import.meta.url)), "utf8");
const block = /```ts\n(import \{ DecisionEngine \} from "@leeway\/policy";[\s\S]*?)```/.exec(readme)?.[1];

function runReadme(attendance: "attended" | "unattended") {
  const body = (block as string)
    .replace(/^import \{([^}]*)\} from "@leeway\/policy";$/m, "const {$1} = policy;")
    .replace(/^const attendance = "unattended";/m, `const attendance = "${attendance}";`);
  const js = ts.transpileModule(body, { compilerOptions: { target: ts.ScriptTarget.ES2022, module: ts.ModuleKind.None } }).outputText;
  const rng = new RandomSource(11);
  const state = { level: 1, learnt: 0, alarms: [] as Decision["cause"][], questions: 0, ackAt: -1, i: 0 };
  const myModel = { loss: () => state.level * (1 + 0.1 * Math.abs(rng.normal())), learn: () => void state.learnt++ };
  const myFrozenModel = { loss: () => state.level * (1 + 0.1 * Math.abs(rng.normal())) };
  const retrain = (done: () => void): void => done();
  const notifyOperator = (cause: Decision["cause"]): void => {
    state.alarms.push(cause);
    state.ackAt = state.i + 60; // attended: someone looks a minute later
  };
  const askOperator = (): void => void state.questions++;
  const run = new Function("policy", "myModel", "myFrozenModel", "retrain", "notifyOperator", "askOperator", `${js}\nreturn { onSample, engine };`);
  const { onSample, engine } = run(policy, myModel, myFrozenModel, retrain, notifyOperator, askOperator) as { onSample: (x: Float64Array) => void; engine: policy.DecisionEngine };
  const x = new Float64Array(4);
  const feed = (n: number): void => {
    for (let k = 0; k < n; k++, state.i++) {
      onSample(x);
      if (state.i === state.ackAt && attendance === "attended") engine.acknowledge();
    }
  };
  return { state, feed };
}

describe("the README's embedding example", () => {
  it("has a ts block importing DecisionEngine with an attendance line", () => {
    expect(block).toBeDefined();
    expect(block).toMatch(/^const attendance = "unattended";/m);
  });

  for (const attendance of ["unattended", "attended"] as const) {
    it(`runs as written, ${attendance}: learns normal samples, alarms once on a 3-minute jump, and learns again after it`, () => {
      const { state, feed } = runReadme(attendance);
      feed(3000);
      expect(state.learnt).toBeGreaterThanOrEqual(600); // at least the commissioning window
      expect(state.alarms).toEqual([]);
      state.level = 30; // a jump no normal score reaches
      feed(180);
      expect(state.alarms).toEqual(["anomaly"]);
      state.level = 1;
      const before = state.learnt;
      feed(3000);
      expect(state.alarms).toEqual(["anomaly"]); // no second page for the same event
      expect(state.questions).toBe(0);
      expect(state.learnt - before).toBeGreaterThan(500); // the model learns again
    });
  }
});
