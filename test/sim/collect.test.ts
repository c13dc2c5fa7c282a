import { describe, expect, it } from "vitest";
import { MachineSimulator, collect, conceptDrift } from "@leeway/sim";

describe("collect", () => {
  it("keeps a copy of every spectrum, the truth per sample and the events, equal to iterating the simulator", () => {
    const scenario = conceptDrift({ length: 150, seed: 4 });
    const got = collect(scenario);
    const sim = new MachineSimulator(scenario);
    expect(got.spectra.length).toBe(150);
    expect(new Set(got.spectra.map((s) => s.buffer)).size).toBe(150);
    for (let i = 0; i < 150; i++) {
      const s = sim.next();
      expect(Array.from(got.spectra[i] ?? [])).toEqual(Array.from(s?.spectrum ?? []));
      expect(got.truth[i]).toEqual(s?.truth);
    }
    expect(got.events).toEqual(sim.events);
    expect(got.truth[149]?.environment).toBe(1);
  });
});
