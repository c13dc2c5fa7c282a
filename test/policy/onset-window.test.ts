import { describe, expect, it } from "vitest";
import { changeOnset } from "@leeway/policy";
import { ChangeWatch } from "../../packages/policy/src/change-watch.js";
import { ONSET_WINDOW, OnsetWindow } from "../../packages/policy/src/onset-window.js";
import { throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";

const SETTINGS = { changeTest: "cusum", targetArl0: 500, calibrationReplicates: 10, baselineHalfLife: 100, martingaleThreshold: 100, scoreClip: 6 } as const;
const step = (i: number, at: number, size: number): number => (i < at ? 0 : size) + 0.3 * Math.sin(i * 1.7);

describe("OnsetWindow", () => {
  it("the @example: a step 50 samples before the alarm is placed at its sample", () => {
    const w = new OnsetWindow();
    for (let i = 0; i < 200; i++) w.push(step(i, 150, 3));
    expect(w.onset(1199).at).toBe(1150);
  });

  it("keeps the newest ONSET_WINDOW scores, oldest first, and answers as changeOnset over them", () => {
    const w = new OnsetWindow();
    const xs = Array.from({ length: 700 }, (_, i) => step(i, 600, 2));
    for (const x of xs) w.push(x);
    expect(w.size).toBe(ONSET_WINDOW);
    expect(Array.from(w.values())).toEqual(xs.slice(-ONSET_WINDOW));
    const o = changeOnset(xs.slice(-ONSET_WINDOW), { firstIndex: 5699 - ONSET_WINDOW + 1 });
    expect(w.onset(5699)).toEqual({ at: o.onset, earliest: o.earliest, latest: o.latest, probability: o.probability });
    expect(w.onset(5699).at).toBe(5600);
  });

  it("without a change in the window, or with fewer than two scores, settling starts at the alarm itself", () => {
    const w = new OnsetWindow();
    expect(w.onset(40).at).toBe(40);
    for (let i = 0; i < 100; i++) w.push(0.3 * Math.sin(i * 1.7));
    expect(w.onset(140).at).toBe(140);
  });
});

describe("ChangeWatch keeps the scores it tested for the onset", () => {
  const armed = (): ChangeWatch => {
    const w = new ChangeWatch(SETTINGS);
    w.arm(Float64Array.from({ length: 200 }, (_, i) => Math.sin(i)), "seed", true);
    return w;
  };

  it("places a fired change where its level moved, forgets the scores when armed again, and restores them exactly", () => {
    const w = armed();
    let i = 0;
    for (; i < 400 && w.observe(step(i, 300, 3)).status !== "change"; i++);
    expect(i).toBeGreaterThan(300);
    const index = 1000 + i; // the stream index of the firing sample
    expect(w.onset(index).at).toBe(1300);
    const copy = ChangeWatch.restore(throughJson(w.snapshot()), SETTINGS);
    expect(copy.onset(index)).toEqual(w.onset(index));
    expectRefusesCorruptions((s) => ChangeWatch.restore(s, SETTINGS), w.snapshot(), { variableLengthPaths: [["recent"]] });
    w.arm(Float64Array.from({ length: 200 }, (_, k) => Math.sin(k)), "seed", false);
    expect(w.onset(index).at).toBe(index);
  });

  it("refuses a snapshot whose kept scores lie beyond the clip or outnumber the window", () => {
    const w = armed();
    for (let i = 0; i < 10; i++) w.observe(0.1);
    const beyond = throughJson(w.snapshot()) as { state: { recent: number[] } };
    beyond.state.recent[3] = 7;
    expect(() => ChangeWatch.restore(beyond, SETTINGS)).toThrow(/recent/);
    const long = throughJson(w.snapshot()) as { state: { recent: number[] } };
    long.state.recent = new Array(ONSET_WINDOW + 1).fill(0);
    expect(() => ChangeWatch.restore(long, SETTINGS)).toThrow(/recent/);
  });
});
