import { describe, expect, test } from "vitest";
import { partitionKeys, partitionOf } from "@leeway/fleet";
import { fnv1a } from "../../packages/fleet/src/keys.js";
import { expectLeewayError } from "../support/errors.js";

describe("partition keys", () => {
  test("FNV-1a 32-bit of '', 'a' and 'foobar' is 811c9dc5, e40c292c, bf9cf968 (Fowler–Noll–Vo reference test vectors, from memory)", () => {
    expect(fnv1a("").toString(16)).toBe("811c9dc5");
    expect(fnv1a("a").toString(16)).toBe("e40c292c");
    expect(fnv1a("foobar").toString(16)).toBe("bf9cf968");
  });

  test("a stream's partition is its hash modulo the count, the same on every call; streams spread over every partition", () => {
    expect(partitionOf("a", 7)).toBe(0xe40c292c % 7);
    const seen = new Set<number>();
    for (let i = 0; i < 200; i++) seen.add(partitionOf(`ps${i}-de`, 16));
    expect(seen.size).toBe(16);
    expectLeewayError(() => partitionOf("a", 0), "E_OPTION", "partitions", "0");
  });

  test("every key of a partition carries the same hash tag, so one script touches one cluster slot", () => {
    const keys = Object.values(partitionKeys("leeway", 12));
    const tags = keys.map((k) => /\{([^}]*)\}/.exec(k)?.[1]);
    expect(new Set(tags)).toEqual(new Set(["leeway:p12"]));
    expect(new Set(keys).size).toBe(keys.length);
  });
});
