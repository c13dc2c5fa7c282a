import { parentPort } from "node:worker_threads";
import { qualityScenarios, runQualityScenario } from "@leeway/eval";
import { scriptedQualityOperator } from "./quality-operator.js";

/**
 * A worker thread of `leeway quality`: receives `{ index, id }` (a scenario
 * of the deterministic full suite, by id), runs it and posts `{ progress }`
 * messages, then `{ index, outcome }`.
 */
const port = parentPort;
if (port !== null) {
  const scenarios = new Map(qualityScenarios().map((s) => [s.id, s]));
  port.on("message", (message: { index: number; id: string }) => {
    const scenario = scenarios.get(message.id);
    if (scenario === undefined) throw new Error(`quality worker: no scenario ${message.id}`);
    const outcome = runQualityScenario(scenario, { operator: scriptedQualityOperator, onProgress: (samples) => port.postMessage({ progress: samples }) });
    port.postMessage({ index: message.index, outcome });
  });
}
