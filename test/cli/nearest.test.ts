import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { editDistance, nearestWord, suggestion } from "../../packages/cli/src/nearest.js";

/** Brute force: the optimal-string-alignment distance by plain recursion on prefixes (tiny inputs only). */
function slowDistance(a: string, b: string): number {
  if (a.length === 0) return b.length;
  if (b.length === 0) return a.length;
  const cost = a[a.length - 1] === b[b.length - 1] ? 0 : 1;
  let d = Math.min(slowDistance(a.slice(0, -1), b) + 1, slowDistance(a, b.slice(0, -1)) + 1, slowDistance(a.slice(0, -1), b.slice(0, -1)) + cost);
  if (a.length > 1 && b.length > 1 && a[a.length - 1] === b[b.length - 2] && a[a.length - 2] === b[b.length - 1]) d = Math.min(d, slowDistance(a.slice(0, -2), b.slice(0, -2)) + 1);
  return d;
}

describe("editDistance", () => {
  it("counts insertions, deletions, substitutions and adjacent swaps as one each (worked cases)", () => {
    expect(editDistance("", "")).toBe(0);
    expect(editDistance("scale", "scale")).toBe(0);
    expect(editDistance("threshhold", "threshold")).toBe(1); // one deletion
    expect(editDistance("sacle", "scale")).toBe(1); // one swap
    expect(editDistance("kitten", "sitting")).toBe(3); // Levenshtein's classic example
    expect(editDistance("ca", "abc")).toBe(3); // OSA, not unrestricted Damerau (which gives 2)
  });

  it("equals the recursive definition on short strings over a small alphabet", () => {
    const word = fc.string({ unit: fc.constantFrom("a", "b", "c"), maxLength: 6 });
    fc.assert(fc.property(word, word, (a, b) => editDistance(a, b) === slowDistance(a, b)));
  });

  it("is symmetric and zero exactly for equal strings", () => {
    fc.assert(fc.property(fc.string({ maxLength: 12 }), fc.string({ maxLength: 12 }), (a, b) => editDistance(a, b) === editDistance(b, a) && (editDistance(a, b) === 0) === (a === b)));
  });
});

describe("nearestWord", () => {
  const keys = ["commissioning", "calibration", "hidden", "members", "retrain", "retrainBudget", "seed"];
  it("suggests the known key a misspelling is closest to", () => {
    expect(nearestWord("comissioning", keys)).toBe("commissioning");
    expect(nearestWord("hiden", keys)).toBe("hidden");
    expect(nearestWord("retrainbudget", keys)).toBe("retrainBudget");
    expect(nearestWord("Seed", keys)).toBe("seed");
  });
  it("suggests nothing for a word far from every key", () => {
    expect(nearestWord("colour", keys)).toBeUndefined();
    expect(suggestion("colour", keys)).toBe("");
  });
  it("renders the suggestion for an error message", () => {
    expect(suggestion("membrs", keys, (s) => `"${s}"`)).toBe('; did you mean "members"?');
  });
});
