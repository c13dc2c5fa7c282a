import fc from "fast-check";
import { describe, expect, test } from "vitest";
import { operatorFields, parseRecord, sampleFields } from "@leeway/fleet";

describe("input records", () => {
  test("a sample written by sampleFields reads back to the same doubles", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ noNaN: true, noDefaultInfinity: true }), { minLength: 1, maxLength: 8 }), fc.option(fc.double({ noNaN: true, noDefaultInfinity: true }), { nil: undefined }), (values, time) => {
        const r = parseRecord(sampleFields("ps2-de", "harbour-lane", values, time), false);
        expect(r.kind).toBe("sample");
        if (r.kind !== "sample") return;
        expect(Array.from(r.values).map((x) => Object.is(x, -0) ? 0 : x)).toEqual(values.map((x) => Object.is(x, -0) ? 0 : x));
        expect(r.time === null ? undefined : Number(r.time)).toEqual(time === undefined ? undefined : Object.is(time, -0) ? 0 : time);
      }),
      { numRuns: 300 },
    );
  });

  test("bad records are named with what is wrong, never thrown", () => {
    const reason = (fields: string[], allow = false): string => {
      const r = parseRecord(fields, allow);
      return r.kind === "malformed" ? r.reason : `parsed as ${r.kind}`;
    };
    expect(reason(["v", "1"])).toBe("field s (stream id) is missing or empty");
    expect(reason(["s", "x"])).toBe("neither v (a sample) nor op (an operator event) is given");
    expect(reason(["s", "x", "v", "1,,2"])).toBe('v[1] is not a number: ""');
    expect(reason(["s", "x", "v", "0x10"])).toBe('v[0] is not a number: "0x10"');
    expect(reason(["s", "x", "v", "-inf"])).toBe('v[0] is not finite: "-inf"');
    expect(reason(["s", "x", "v", "1", "t", "noon"])).toBe('t is not a finite number: "noon"');
    expect(reason(["s", "x", "op", "reboot"])).toMatch(/^op "reboot" is not one of acknowledge, /);
    expect(reason(["s", "x".repeat(300), "v", "1"])).toBe("stream id is 300 characters long; at most 256 are allowed");
    expect(reason(["s", "x", "v", "1e999"])).toBe('v[0] is not finite: "1e999"');
  });

  test("non-finite values pass when the engines skip them (nonFinite \"skip\"); operator events keep their length", () => {
    const r = parseRecord(["s", "x", "v", "NaN,-Infinity"], true);
    expect(r.kind === "sample" && Array.from(r.values)).toEqual([NaN, -Infinity]);
    expect(parseRecord(operatorFields("x", "harbour-lane", "start-commissioning", 600), false)).toEqual({ kind: "operator", stream: "x", site: "harbour-lane", event: "start-commissioning", length: 600 });
  });
});
