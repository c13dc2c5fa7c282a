import { describe, expect, it } from "vitest";
import { abruptFault, conceptDrift, driftThenDegradation, recurringModes, slowDegradation, type TruthEvent } from "@leeway/sim";
import { alarmsIn, BaselinePolicy, enginePolicy, runPolicy, stream, SUITE_LENGTH, type Policy, type PolicyRun } from "./policy.support.js";

// The engine against two baselines built from the same parts (an OS-ELM
// autoencoder pool, the same calibration of the anomaly threshold, the same
// operator): "frozen only" never adapts, "always adapt" learns everything
// with forgetting and no gating. Same suite, same seeds.

const L = SUITE_LENGTH;
const suite = {
  conceptDrift: () => conceptDrift({ length: L, seed: 1 }),
  recurringModes: () => recurringModes({ length: L, seed: 1 }),
  slowDegradation: () => slowDegradation({ length: L, seed: 1 }),
  driftThenDegradation: () => driftThenDegradation({ length: L, seed: 1 }),
  abruptFault: () => abruptFault({ length: L, seed: 1 }),
};

interface Row {
  policy: string;
  falseAlarmsAfterDrift: number;
  missedDegradations: number;
  degradationDelay: number;
  faultsDetected: number;
  retrains: number;
}

/**
 * False alarms after drift: alarms from a concept-drift event's start to the
 * next event of another cause (or the end), minus one alarm allowed at the
 * onset itself (an abrupt change is reported once before it is understood).
 * A degradation is missed when no alarm falls inside its event.
 */
function score(policy: string, make: () => Policy): Row {
  const row: Row = { policy, falseAlarmsAfterDrift: 0, missedDegradations: 0, degradationDelay: 0, faultsDetected: 0, retrains: 0 };
  for (const [name, scenario] of Object.entries(suite)) {
    const { spectra, events } = stream(name, scenario);
    const run: PolicyRun = runPolicy(make(), spectra);
    row.retrains += run.retrains.length;
    const sorted = [...events].sort((a, b) => a.start - b.start);
    sorted.forEach((e: TruthEvent, k) => {
      const next = sorted.slice(k + 1).find((n) => n.cause !== "concept-drift")?.start ?? L;
      if (e.cause === "concept-drift") row.falseAlarmsAfterDrift += Math.max(0, alarmsIn(run, e.start, Math.min(e.end, next)).length - 1);
      if (e.cause === "degradation") {
        const hits = alarmsIn(run, e.start, e.end);
        if (hits.length === 0) row.missedDegradations += 1;
        else row.degradationDelay += (hits[0] as number) - e.start;
      }
      if (e.cause === "anomaly" && alarmsIn(run, e.start, e.end).length > 0) row.faultsDetected += 1;
    });
  }
  return row;
}

describe("the engine against its baselines", () => {
  it("has fewer false alarms after drift than frozen-only and fewer missed degradations than always-adapt", () => {
    const rows = [score("engine", () => enginePolicy()), score("frozen only", () => new BaselinePolicy("frozen only")), score("always adapt", () => new BaselinePolicy("always adapt"))];
    const table = [
      "| policy | false alarms after drift | missed degradations (of 2) | delay to first degradation alarm (samples, summed) | faults detected (of 1) | retrains |",
      "|---|---|---|---|---|---|",
      ...rows.map((r) => `| ${r.policy} | ${r.falseAlarmsAfterDrift} | ${r.missedDegradations} | ${r.degradationDelay} | ${r.faultsDetected} | ${r.retrains} |`),
    ].join("\n");
    console.log(`\nsuite: conceptDrift, recurringModes, slowDegradation, driftThenDegradation, abruptFault (length ${L}, seed 1)\n${table}\n`);
    const [engine, frozen, adapt] = rows as [Row, Row, Row];
    expect(engine.falseAlarmsAfterDrift).toBeLessThan(frozen.falseAlarmsAfterDrift);
    expect(engine.missedDegradations).toBeLessThan(adapt.missedDegradations);
    expect(engine.missedDegradations).toBe(0);
    expect(engine.faultsDetected).toBe(1);
  });
});
