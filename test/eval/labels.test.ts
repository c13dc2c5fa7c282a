import { describe, expect, it } from "vitest";
import { anomalyMask } from "@leeway/eval";
import { expectLeewayError } from "../support/errors.js";

describe("anomalyMask", () => {
  it("flags the samples inside events of the chosen causes, clipped to the length", () => {
    const events = [
      { cause: "anomaly" as const, start: 2, end: 4 },
      { cause: "degradation" as const, start: 5, end: 9 },
    ];
    expect(anomalyMask(events, 7)).toEqual([false, false, true, true, false, false, false]);
    expect(anomalyMask(events, 7, ["anomaly", "degradation"])).toEqual([false, false, true, true, false, true, true]);
  });

  it("refuses a bad length and malformed events", () => {
    expectLeewayError(() => anomalyMask([], -1), "E_OPTION", "length", "-1");
    expectLeewayError(() => anomalyMask([{ cause: "anomaly", start: 3, end: 2 }], 5), "E_OPTION", "labels.events[0].end", "2");
    expectLeewayError(() => anomalyMask("events" as never, 5), "E_OPTION", "labels.events");
  });
});
