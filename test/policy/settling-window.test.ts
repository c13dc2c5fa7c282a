import { describe, expect, it } from "vitest";
import { SettlingWindow } from "../../packages/policy/src/settling-window.js";
import { throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";

describe("SettlingWindow", () => {
  it("keeps the last width samples, oldest first, with their levels, half shift and spread", () => {
    const w = new SettlingWindow(4);
    [1, 2, 3, 4, 5, 6].forEach((x) => w.push(x, 10 * x, -x));
    expect(w.full).toBe(true);
    expect(w.positions().map((p) => w.activeAt(p))).toEqual([3, 4, 5, 6]);
    const c = w.check();
    expect(c.activeLevel).toBe(4.5);
    expect(c.commissioningLevel).toBe(45);
    expect(c.newestLevel).toBe(-4.5);
    expect(c.shift).toBe(2); // (5 + 6)/2 − (3 + 4)/2
    expect(c.activeSpread).toBeCloseTo(Math.sqrt(5 / 3), 12);
    expect(c.trendZ).toBeGreaterThan(0);
  });

  it("a flat window is stationary: no trend, no shift", () => {
    const w = new SettlingWindow(6);
    for (let i = 0; i < 6; i++) w.push(2, 2, 2);
    const c = w.check();
    expect([c.trendZ, c.shift, c.activeSpread]).toEqual([0, 0, 0]);
  });

  it("clear() empties it; a restored window continues identically; corrupted snapshots are refused", () => {
    const w = new SettlingWindow(5);
    for (let i = 0; i < 7; i++) w.push(Math.sin(i), i, -i);
    const r = SettlingWindow.restore(throughJson(w.snapshot()), 5);
    w.push(0.5, 1, 2);
    r.push(0.5, 1, 2);
    expect(r.check()).toEqual(w.check());
    expectRefusesCorruptions((s) => SettlingWindow.restore(s, 5), w.snapshot(), { sizePaths: [["width"]] });
    w.clear();
    expect([w.count, w.head, w.positions().length]).toEqual([0, 0, 0]);
  });
});
