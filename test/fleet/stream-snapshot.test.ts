import { deflateRawSync } from "node:zlib";
import { describe, expect, test } from "vitest";
import { DecisionEngine } from "@leeway/policy";
import { decodeEngine, encodeEngine } from "@leeway/fleet";
import { expectLeewayError } from "../support/errors.js";
import { SMALL_ENGINE } from "./fleet-stream.js";

describe("stored engine snapshots", () => {
  test("an engine restored from its compressed snapshot continues bit for bit (every decision and the final snapshot equal)", () => {
    const a = new DecisionEngine(SMALL_ENGINE);
    const level = (i: number): number => (i < 400 ? 1 : 1.9) * Math.exp(0.1 * Math.sin(i * 1.7));
    for (let i = 0; i < 250; i++) a.observeScores(level(i));
    const bytes = encodeEngine(a);
    expect(bytes.length).toBeLessThan(JSON.stringify(a.snapshot()).length / 2);
    const b = decodeEngine(bytes);
    for (let i = 250; i < 700; i++) expect(JSON.stringify(b.observeScores(level(i)))).toBe(JSON.stringify(a.observeScores(level(i))));
    expect(JSON.stringify(b.snapshot())).toBe(JSON.stringify(a.snapshot()));
  });

  test("bytes that do not inflate, inflate to no JSON, or restore to a broken engine are refused whole with E_SNAPSHOT", () => {
    expectLeewayError(() => decodeEngine(Buffer.from("plain text")), "E_SNAPSHOT", "do not inflate");
    expectLeewayError(() => decodeEngine(deflateRawSync("{not json")), "E_SNAPSHOT", "is not JSON");
    const snapshot = new DecisionEngine(SMALL_ENGINE).snapshot();
    const broken = { ...snapshot, state: { ...snapshot.state, core: { ...(snapshot.state.core as object), version: 99 } } };
    expectLeewayError(() => decodeEngine(deflateRawSync(JSON.stringify(broken))), "E_SNAPSHOT", "snapshot of");
    const truncated = encodeEngine(new DecisionEngine(SMALL_ENGINE));
    expectLeewayError(() => decodeEngine(truncated.subarray(0, truncated.length - 40)), "E_SNAPSHOT", "snapshot of");
  });
});
