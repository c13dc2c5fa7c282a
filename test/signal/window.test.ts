import { describe, expect, it } from "vitest";
import { makeWindow, WINDOW_NAMES } from "@leeway/signal";
import { expectLeewayError } from "../support/errors.js";

describe("makeWindow", () => {
  it("periodic windows: w[0] is the window's minimum edge value and w is symmetric about N/2", () => {
    for (const name of WINDOW_NAMES) {
      const w = makeWindow(name, 64).values;
      for (let n = 1; n < 32; n++) expect(w[n]).toBeCloseTo(w[64 - n] as number, 14);
    }
    expect(makeWindow("hann", 64).values[0]).toBeCloseTo(0, 15);
    expect(makeWindow("hann", 64).values[32]).toBeCloseTo(1, 15);
    expect(makeWindow("hamming", 64).values[0]).toBeCloseTo(0.08, 15);
  });

  it("coherent gain equals the mean of the samples and ENBW equals N·Σw²/(Σw)², for every size", () => {
    for (const name of WINDOW_NAMES) {
      for (const n of [16, 100, 1024]) {
        const w = makeWindow(name, n);
        let s = 0;
        let s2 = 0;
        for (const v of w.values) {
          s += v;
          s2 += v * v;
        }
        expect(w.coherentGain).toBeCloseTo(s / n, 14);
        expect(w.enbw).toBeCloseTo((n * s2) / (s * s), 12);
        expect(w.powerGain).toBeCloseTo(s2 / n, 14);
      }
    }
  });

  it("refuses unknown names and bad sizes", () => {
    expectLeewayError(() => makeWindow("kaiser" as never, 8), "E_OPTION", "name", "hann");
    for (const bad of [0, -1, 1.5, Number.NaN]) expectLeewayError(() => makeWindow("hann", bad), "E_OPTION", "size");
  });
});
