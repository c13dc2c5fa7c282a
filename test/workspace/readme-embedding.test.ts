import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import ts from "typescript";
import { describe, expect, it } from "vitest";
import * as policy from "@leeway/policy";
import { RandomSource } from "@leeway/core";
import type { Decision } from "@leeway/policy";

// The README's embedding example, run as written (types stripped by the TypeScript compiler)
// with stand-in models, on a score stream that stays normal and then develops a step.
describe("the README's embedding example", () => {
  it("runs as written: learns normal samples and raises an alarm on a lasting jump of the scores", () => {
    const readme = readFileSync(fileURLToPath(new URL("../../README.md", import.meta.url)), "utf8");
    const block = /```ts\n(import \{ DecisionEngine \} from "@leeway\/policy";[\s\S]*?)```/.exec(readme)?.[1];
    expect(block, "README has a ts block importing DecisionEngine").toBeDefined();
    const body = (block as string).replace(/^import \{([^}]*)\} from "@leeway\/policy";$/m, "const {$1} = policy;");
    const js = ts.transpileModule(body, { compilerOptions: { target: ts.ScriptTarget.ES2022, module: ts.ModuleKind.None } }).outputText;

    const rng = new RandomSource(11);
    let level = 1;
    let learnt = 0;
    const alarms: Decision["cause"][] = [];
    const myModel = { loss: () => level * (1 + 0.1 * Math.abs(rng.normal())), learn: () => void learnt++ };
    const myFrozenModel = { loss: () => level * (1 + 0.1 * Math.abs(rng.normal())) };
    const retrain = (done: () => void): void => done();
    const notifyOperator = (cause: Decision["cause"]): void => void alarms.push(cause);
    const run = new Function("policy", "myModel", "myFrozenModel", "retrain", "notifyOperator", `${js}\nreturn onSample;`);
    const onSample = run(policy, myModel, myFrozenModel, retrain, notifyOperator) as (x: Float64Array) => void;

    const x = new Float64Array(4);
    for (let i = 0; i < 3000; i++) onSample(x);
    expect(learnt).toBeGreaterThanOrEqual(600); // at least the commissioning window
    expect(alarms).toEqual([]);
    level = 30; // a jump no normal score reaches
    for (let i = 0; i < 200; i++) onSample(x);
    expect(alarms.length).toBeGreaterThan(0);
    expect(alarms[0]).toBe("anomaly");
  });
});
