import { it } from "vitest";
import { RandomSource } from "@leeway/core";
import { MachineSimulator, harbourLane, slowDegradation, stationaryNull, type Scenario } from "@leeway/sim";
import { BenchReport, consume, nsPerOp, sumBaselineNs } from "./harness.js";

/** ns per simulated sample of `make()`'s scenario, in raw-frame or spectrum mode. */
function perSample(make: () => Scenario, mode: "frame" | "spectrum"): number {
  let sim = new MachineSimulator(make());
  const batch = 50;
  return nsPerOp(() => {
    let s = 0;
    for (let k = 0; k < batch; k++) {
      const r = mode === "frame" ? sim.frame()?.frame : sim.next()?.spectrum;
      if (r === undefined) {
        sim = new MachineSimulator(make());
        k--;
        continue;
      }
      s += r[3] as number;
    }
    consume(s);
  }, batch);
}

it("sim: simulated samples per second", () => {
  const report = new BenchReport("sim");
  const baseline = sumBaselineNs(new RandomSource(1).fillUniform(new Float64Array(1 << 16)));
  const L = 1_000_000;
  // degradation active from the first sample: the costliest case (nine extra tones)
  const degrading = (): Scenario => slowDegradation({ length: L, seed: 2 });
  const rows: [string, () => Scenario, "frame" | "spectrum"][] = [
    ["stationaryNull raw frame (1024 samples), per frame", () => stationaryNull({ length: L }), "frame"],
    ["stationaryNull frame -> 256-bin spectrum, per sample", () => stationaryNull({ length: L }), "spectrum"],
    ["slowDegradation frame -> 256-bin spectrum, per sample", degrading, "spectrum"],
    ["harbourLane (scale 3600) frame -> spectrum, per sample", () => harbourLane(), "spectrum"],
  ];
  for (const [name, make, mode] of rows) {
    const ns = perSample(make, mode);
    report.add(name, ns, baseline, `${(1e9 / ns).toFixed(0)} samples/s; 10^5 samples in ${((ns * 1e5) / 1e9).toFixed(2)} s`);
  }
  report.write();
});
