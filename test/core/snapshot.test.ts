import { describe, expect, it } from "vitest";
import { checkedSize, envelope, MAX_SNAPSHOT_ELEMENTS, openSnapshot, toPlainArray } from "@leeway/core";
import { expectLeewayError } from "../support/errors.js";

describe("snapshot envelope", () => {
  const good = envelope("leeway.test.thing", 2, { n: 3, xs: [1, 2, 3], name: "a", flag: true, inner: { v: 1 }, list: [{ a: 1 }], maybe: null });

  it("reads valid fields", () => {
    const r = openSnapshot(good, "leeway.test.thing", 2);
    expect(r.integer("n", 0, 10)).toBe(3);
    expect(Array.from(r.numbers("xs", 3))).toEqual([1, 2, 3]);
    expect(Array.from(r.numbers("xs", { max: 5 }))).toEqual([1, 2, 3]);
    expect(r.integers("xs", 3, 0, 5)).toEqual([1, 2, 3]);
    expect(r.string("name")).toBe("a");
    expect(r.oneOf("name", ["a", "b"])).toBe("a");
    expect(r.boolean("flag")).toBe(true);
    expect(r.object("inner").number("v")).toBe(1);
    expect(r.objects("list", 1)[0]?.number("a")).toBe(1);
    expect(r.numberOrNull("maybe")).toBeNull();
    expect(r.objectOrNull("maybe")).toBeNull();
    expect(r.has("nothing")).toBe(false);
  });

  it("refuses wrong kinds, versions and malformed fields with E_SNAPSHOT naming the path", () => {
    expectLeewayError(() => openSnapshot(good, "leeway.test.other", 2), "E_SNAPSHOT", "kind");
    expectLeewayError(() => openSnapshot(good, "leeway.test.thing", 1), "E_SNAPSHOT", "newer than the supported version 1");
    expectLeewayError(() => openSnapshot({ ...good, version: 1 }, "leeway.test.thing", 2), "E_SNAPSHOT", "only version 2");
    expectLeewayError(() => openSnapshot(null, "k", 1), "E_SNAPSHOT", "must be an object");
    expectLeewayError(() => openSnapshot({ kind: "k", version: 1, state: [] }, "k", 1), "E_SNAPSHOT", "state");
    const r = openSnapshot(good, "leeway.test.thing", 2);
    expectLeewayError(() => r.number("missing"), "E_SNAPSHOT", "state.missing is missing");
    expectLeewayError(() => r.integer("n", 4, 10), "E_SNAPSHOT", "state.n", "[4, 10]");
    expectLeewayError(() => r.numbers("xs", 4), "E_SNAPSHOT", "length 4");
    expectLeewayError(() => r.numbers("xs", { max: 2 }), "E_SNAPSHOT", "[0, 2]");
    expectLeewayError(() => r.oneOf("name", ["b"]), "E_SNAPSHOT", '"b"');
    expectLeewayError(() => r.object("inner").string("v"), "E_SNAPSHOT", "state.inner.v");
    expectLeewayError(() => r.boolean("name"), "E_SNAPSHOT", "boolean");
    const bad = openSnapshot(envelope("k", 1, { xs: [1, Number.NaN] }), "k", 1);
    expectLeewayError(() => bad.numbers("xs", 2), "E_SNAPSHOT", "state.xs[1]", "NaN");
  });

  it("caps sizes before allocation", () => {
    expect(checkedSize("k", "p", [256, 32])).toBe(8192);
    expectLeewayError(() => checkedSize("k", "state.inputs", [1e9, 32]), "E_SNAPSHOT", "state.inputs", `${MAX_SNAPSHOT_ELEMENTS}`);
    expect(toPlainArray(new Float64Array([1, 2, 3]), 2)).toEqual([1, 2]);
  });
});
