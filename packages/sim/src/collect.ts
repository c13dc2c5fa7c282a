import { MachineSimulator } from "./machine-simulator.js";
import type { Scenario, ScenarioSpec } from "./scenario.js";
import type { SampleTruth, TruthEvent } from "./truth.js";

/** A whole simulated stream in memory. */
export interface CollectedStream {
  /** One spectrum per sample (copies). */
  spectra: Float64Array[];
  truth: SampleTruth[];
  events: TruthEvent[];
}

/**
 * Runs a scenario to the end and keeps every spectrum (for tests and small
 * demos: 256 values × 8 bytes per sample, about 200 MB for 10^5 samples —
 * iterate {@link MachineSimulator.next} for long streams).
 * @example
 * const { spectra, truth } = collect(conceptDrift({ length: 200 }));
 * spectra.length; // 200
 * truth[150]?.environment; // 1
 */
export function collect(scenario: Scenario | ScenarioSpec): CollectedStream {
  const sim = new MachineSimulator(scenario);
  const spectra: Float64Array[] = [];
  const truth: SampleTruth[] = [];
  for (let s = sim.next(); s !== null; s = sim.next()) {
    spectra.push(Float64Array.from(s.spectrum));
    truth.push(s.truth);
  }
  return { spectra, truth, events: sim.events };
}
