import { describe, expect, it } from "vitest";
import { eventSeverity, FULL_SUITE_SEEDS, qualityScenarios, qualitySubset, QUALITY_KINDS, QUALITY_SUBSET_IDS } from "@leeway/eval";
import { MachineSimulator, truthEvents } from "@leeway/sim";

describe("qualityScenarios", () => {
  const suite = qualityScenarios();

  it("covers every event kind at both rates with unique ids; the same call gives the same list", () => {
    expect(new Set(suite.map((s) => s.id)).size).toBe(suite.length);
    for (const kind of QUALITY_KINDS) for (const rate of ["1 s", "10 min"]) expect(suite.some((s) => s.kind === kind && s.rate === rate), `${kind} at ${rate}`).toBe(true);
    expect(suite.length).toBeGreaterThanOrEqual(150);
    expect(JSON.stringify(qualityScenarios())).toBe(JSON.stringify(suite));
    expect(Object.keys(FULL_SUITE_SEEDS).sort()).toEqual([...QUALITY_KINDS].sort());
  });

  it("ground truth agrees with the simulator's: same spans and causes, every event after the commissioning and calibration spans", () => {
    for (const s of suite) {
      const sim = truthEvents(s.scenario).map((e) => [e.cause, e.start, e.end]);
      expect(s.events.map((e) => [e.cause, e.start, e.end]), s.id).toEqual(sim);
      for (const e of s.events) expect(e.start).toBeGreaterThanOrEqual(1200);
      if (s.kind === "quiet") expect(s.events).toEqual([]);
      else expect(s.events.length).toBeGreaterThan(0);
    }
  });

  it("marks returns to a mode already seen as known modes", () => {
    const modes = suite.find((s) => s.kind === "recurring-modes")!;
    expect(modes.events.map((e) => e.knownMode)).toEqual([false, true, false, true, true]);
  });

  it("severity follows the truth: a degradation rises to 1 at its last sample, a ramped shift grows linearly, 0 outside an event", () => {
    const degradation = suite.find((s) => s.kind === "degradation" && s.variant.startsWith("linear"))!;
    const e = degradation.events[0]!;
    expect(eventSeverity(degradation, e, e.start - 1)).toBe(0);
    expect(eventSeverity(degradation, e, e.end - 1)).toBe(1);
    expect(eventSeverity(degradation, e, e.start + (e.end - e.start) / 2 - 1)).toBeCloseTo(0.5, 12);
    const gradual = suite.find((s) => s.kind === "gradual-shift")!;
    const g = gradual.events[0]!;
    const sim = new MachineSimulator(gradual.scenario);
    expect(sim.truthAt(g.start).environment).toBe(1);
    expect(eventSeverity(gradual, g, g.start)).toBeGreaterThan(0);
    expect(eventSeverity(gradual, g, g.start)).toBeLessThan(0.01);
    expect(eventSeverity(gradual, g, g.end - 1)).toBe(1);
  });

  it("the subset is a fixed part of the full suite", () => {
    const subset = qualitySubset();
    expect(subset.map((s) => s.id)).toEqual([...QUALITY_SUBSET_IDS]);
    for (const s of subset) expect(JSON.stringify(suite.find((f) => f.id === s.id))).toBe(JSON.stringify(s));
  });
});
