import { describe, expect, it } from "vitest";
import { parseLabels } from "../../packages/cli/src/labels-file.js";

describe("labels file", () => {
  it("reads an array of events or an object with events and anomaly flags", () => {
    expect(parseLabels('[{"cause":"anomaly","start":5,"end":9,"label":"clog"}]', "l.json")).toEqual({ events: [{ cause: "anomaly", start: 5, end: 9, label: "clog" }], anomaly: null });
    const both = parseLabels('{"events":[{"cause":"degradation","start":0,"end":3,"id":"bpfo"}],"anomaly":[0,1,true,false]}', "l.json");
    expect(both.anomaly).toEqual([false, true, true, false]);
    expect(both.events[0]?.id).toBe("bpfo");
  });
  it("names bad events with their place, and suggests the nearest cause or key", () => {
    const text = '{"events": [\n {"cause":"anomaly","start":1,"end":2},\n {"cause":"degredation","start":1,"end":2}\n]}';
    expect(() => parseLabels(text, "l.json")).toThrow('l.json:3:2: event 1: "cause" must be one of concept-drift, degradation, anomaly, got "degredation"; did you mean "degradation"?');
    expect(() => parseLabels('[{"cause":"anomaly","start":4,"end":4}]', "l.json")).toThrow('"end" must be an integer sample index > start (4), got 4');
    expect(() => parseLabels('[{"cause":"anomaly","start":-1,"end":4}]', "l.json")).toThrow('"start" must be an integer sample index >= 0');
    expect(() => parseLabels('[{"cause":"anomaly","start":1,"end":4,"lable":5}]', "l.json")).toThrow('unknown key "lable"; did you mean "label"?');
    expect(() => parseLabels('{"event":[]}', "l.json")).toThrow('unknown key "event"; did you mean "events"?');
    expect(() => parseLabels('{"events":[],"anomaly":[2]}', "l.json")).toThrow('"anomaly"[0] must be true, false, 1 or 0, got 2');
  });
});
