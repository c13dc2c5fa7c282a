import { describe, expect, it } from "vitest";
import { abruptFault, conceptDrift, driftThenDegradation, recurringModes, slowDegradation, stationaryNull, SUITE_DEFAULT_LENGTH, truthEvents } from "@leeway/sim";
import { expectLeewayError } from "../support/errors.js";

const presets = { stationaryNull, conceptDrift, slowDegradation, driftThenDegradation, recurringModes, abruptFault };

describe("test-suite presets", () => {
  it("default length 20 000 and seed 1; the timelines at the default length", () => {
    const starts = Object.fromEntries(Object.entries(presets).map(([name, make]) => [name, truthEvents(make()).map((e) => [e.type, e.start, e.end])]));
    expect(starts).toEqual({
      stationaryNull: [],
      conceptDrift: [["environment-shift", 10000, 20000]],
      slowDegradation: [["degradation", 4000, 20000]],
      driftThenDegradation: [
        ["environment-shift", 5000, 20000],
        ["degradation", 10000, 20000],
      ],
      recurringModes: [
        ["mode-change", 6667, 13333],
        ["mode-change", 13333, 20000],
      ],
      abruptFault: [["fault", 10000, 10500]],
    });
    for (const make of Object.values(presets)) {
      expect(make().length).toBe(SUITE_DEFAULT_LENGTH);
      expect(make().seed).toBe(1);
      expect(make({ seed: "x" }).seed).toBe("x");
    }
  });

  it("refuses lengths below 100, bad seeds and unknown options", () => {
    for (const [name, make] of Object.entries(presets)) {
      expectLeewayError(() => make({ length: 99 }), "E_OPTION", name, "length");
      expectLeewayError(() => make({ length: 1.5 }), "E_OPTION", "length");
      expectLeewayError(() => make({ seed: "" }), "E_OPTION", "seed");
      expectLeewayError(() => make({ scale: 3 } as never), "E_OPTION", "scale");
    }
  });
});
