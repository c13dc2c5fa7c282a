import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { ConformalMartingale, restoreChangeTest } from "@leeway/change";
import { expectLeewayError, throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";
import { expectRestoreContinues, expectScanEqualsObserve } from "./laws.js";

/** In-control laws for Ville's bound: continuous, skewed, heavy-tailed and discrete (ties). */
const LAWS: Record<string, (r: RandomSource) => number> = {
  normal: (r) => r.normal(),
  exponential: (r) => r.exponential(1),
  "log-normal": (r) => Math.exp(r.normal(0, 1.5)),
  "Poisson(2) counts": (r) => {
    let k = 0;
    for (let t = r.exponential(1); t < 2; t += r.exponential(1)) k++;
    return k;
  },
};

describe("ConformalMartingale", () => {
  it("the @example", () => {
    const m = new ConformalMartingale({ reference: [0.1, 0.2, 0.3, 0.4, 0.5], threshold: 20 });
    const xs = new Float64Array(200).map((_, i) => (i < 100 ? ((i * 7) % 10) / 20 : 1));
    expect(m.scan(xs)).toBe(115);
  });

  it("Ville's bound: on i.i.d. streams of four laws the probability of ever alarming within 2000 samples stays ≤ 1/λ = 0.1 within 3 binomial standard errors, for each betting (Ville 1939; Vovk et al. 2003, from memory)", () => {
    const runs = 250;
    const bound = 0.1;
    const slack = 3 * Math.sqrt((bound * (1 - bound)) / runs);
    for (const [law, draw] of Object.entries(LAWS)) {
      for (const betting of ["jumper", "power", "mixture"] as const) {
        const rng = new RandomSource(`ville-${law}-${betting}`);
        const xs = new Float64Array(2100);
        let alarms = 0;
        for (let r = 0; r < runs; r++) {
          for (let i = 0; i < xs.length; i++) xs[i] = draw(rng);
          const test = new ConformalMartingale({ threshold: 10, betting, seed: `${law}-${r}` });
          if (test.scan(xs) >= 0) alarms++;
        }
        expect(alarms / runs, `${law}, ${betting}`).toBeLessThanOrEqual(bound + slack);
      }
    }
  });

  it("its p-values are uniform on an exchangeable stream with ties (each decile holds 10 % ± 4 s.e. of 20 000; Vovk, Gammerman & Shafer 2005, smoothed p-values, from memory)", () => {
    const rng = new RandomSource("uniform-p");
    const test = new ConformalMartingale({ burnIn: 50, direction: "both" });
    const deciles = new Array<number>(10).fill(0);
    let n = 0;
    for (let i = 0; i < 20_050; i++) {
      const p = test.observe(Math.round(rng.normal() * 2)).pValue;
      if (p === null) continue;
      expect(p).toBeGreaterThan(0);
      expect(p).toBeLessThanOrEqual(1);
      deciles[Math.min(9, Math.floor(p * 10))]! += 1;
      n++;
    }
    expect(n).toBe(20_000);
    const se = Math.sqrt(0.1 * 0.9 * n);
    for (const d of deciles) expect(Math.abs(d - 0.1 * n)).toBeLessThan(4 * se);
  });

  it("alarms on a rising level, a falling one with direction down and either with both; the onset lies near the true start", () => {
    const rng = new RandomSource("shift");
    const xs = new Float64Array(1500).map((_, i) => rng.normal() + (i >= 1000 ? 1.5 : 0));
    for (const [direction, sign] of [["up", 1], ["down", -1], ["both", 1], ["both", -1]] as const) {
      const test = new ConformalMartingale({ direction, threshold: 100 });
      const at = test.scan(xs.map((x) => sign * x));
      expect(at, `${direction} ${sign}`).toBeGreaterThanOrEqual(1000);
      expect(at).toBeLessThan(1100);
      const onset = test.observe(sign * 1.5).onset ?? -1;
      expect(Math.abs(onset - 1000)).toBeLessThan(60);
    }
    const wrongWay = new ConformalMartingale({ direction: "up", threshold: 100 });
    expect(wrongWay.scan(xs.map((x) => -x))).toBe(-1);
  });

  it("scan finds the changes observe finds and leaves the same state", () => {
    for (const betting of ["jumper", "power", "mixture"] as const) expectScanEqualsObserve(() => new ConformalMartingale({ burnIn: 10, threshold: 5, betting, direction: "both" }), 40);
  });

  it("restored from a JSON snapshot during the burn-in or after it, it continues bit for bit", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -3, max: 3, noNaN: true }), { minLength: 2, maxLength: 120 }), fc.constantFrom("jumper", "power", "mixture"), (values, betting) => {
        const xs = Float64Array.from(values);
        expectRestoreContinues(() => new ConformalMartingale({ burnIn: 20, threshold: 8, betting: betting as "jumper" }), (s) => ConformalMartingale.restore(s), xs);
        expectRestoreContinues(() => new ConformalMartingale({ reference: [-1, 0, 1], threshold: 8, betting: betting as "jumper" }), restoreChangeTest, xs);
      }),
      { numRuns: 60 },
    );
  });

  it("p-values compare a sample with the tested samples only: a reference fixes the grid and is no baseline (a stream that starts above it is in control)", () => {
    const test = new ConformalMartingale({ reference: [0, 1, 2], threshold: 5 });
    expect(test.scan(new Float64Array(500).fill(3))).toBe(-1);
  });

  it("restart sets the martingale back to 1 and forgets the tested counts, keeping the grid", () => {
    const test = new ConformalMartingale({ reference: [0, 1, 2], threshold: 5 });
    const at = test.scan(Float64Array.from({ length: 80 }, (_, i) => (i < 40 ? (i * 0.37) % 2 : 3)));
    expect(at).toBeGreaterThan(0);
    test.restart();
    expect(test.value).toBe(1);
    const s = throughJson(test.snapshot());
    expect(s.state.counts).toEqual([0, 0, 0, 0]);
    expect(s.state.grid).toEqual([0, 1, 2]);
  });

  it("skips non-finite samples when asked and counts them; refuses them otherwise", () => {
    const test = new ConformalMartingale({ burnIn: 10, nonFinite: "skip" });
    const r = test.observe(Number.NaN);
    expect([r.skipped, r.pValue, r.index]).toEqual([1, null, 0]);
    expect(test.scan(Float64Array.from([1, Infinity, 2]))).toBe(-1);
    expect(test.skipped).toBe(2);
    expectLeewayError(() => new ConformalMartingale().observe(Number.NaN), "E_NON_FINITE", "x");
    expectLeewayError(() => new ConformalMartingale().observe(null as never), "E_SAMPLE", "x");
    expectLeewayError(() => new ConformalMartingale().scan(Float64Array.from([1, Number.NaN])), "E_NON_FINITE", "xs[1]");
  });

  it("refuses corrupted snapshots", () => {
    const burning = new ConformalMartingale({ burnIn: 12 });
    burning.scan(Float64Array.from({ length: 7 }, (_, i) => Math.sin(i)));
    expectRefusesCorruptions(ConformalMartingale.restore, burning.snapshot(), { sizePaths: [["burnIn"]], variableLengthPaths: [["grid"]] });
    const running = new ConformalMartingale({ reference: [0, 0.5, 1], betting: "power" });
    running.scan(Float64Array.from({ length: 30 }, (_, i) => Math.cos(i)));
    expectRefusesCorruptions(ConformalMartingale.restore, running.snapshot(), { sizePaths: [["burnIn"]] });
  });

  it("refuses bad options naming them", () => {
    expectLeewayError(() => new ConformalMartingale({ threshold: 1 }), "E_OPTION", "threshold", "1");
    expectLeewayError(() => new ConformalMartingale({ betting: "kelly" as never }), "E_OPTION", "betting", "kelly");
    expectLeewayError(() => new ConformalMartingale({ epsilon: 1 }), "E_OPTION", "epsilon");
    expectLeewayError(() => new ConformalMartingale({ jump: 0 }), "E_OPTION", "jump");
    expectLeewayError(() => new ConformalMartingale({ burnIn: 5 }), "E_OPTION", "burnIn", "5");
    expectLeewayError(() => new ConformalMartingale({ reference: [1] }), "E_OPTION", "reference");
    expectLeewayError(() => new ConformalMartingale({ reference: [1, 2], burnIn: 20 }), "E_OPTION", "burnIn");
    expectLeewayError(() => new ConformalMartingale({ lambda: 3 } as never), "E_OPTION", "lambda");
  });
});
