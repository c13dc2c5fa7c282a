import { describe, expect, it } from "vitest";
import { kendallUpperTail, KENDALL_EXACT_MAX_N } from "@leeway/stats";
import { expectLeewayError } from "../support/errors.js";

/** P(S ≥ N − 2c) for every c, by listing all n! orders (S = concordant − discordant pairs). */
function bruteTail(n: number): number[] {
  const pairs = (n * (n - 1)) / 2;
  const counts = new Array<number>(pairs + 1).fill(0);
  const perm = Array.from({ length: n }, (_, i) => i);
  let total = 0;
  const visit = (k: number): void => {
    if (k === n) {
      let s = 0;
      for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) s += Math.sign((perm[j] as number) - (perm[i] as number));
      counts[(pairs - s) / 2]! += 1;
      total++;
      return;
    }
    for (let i = k; i < n; i++) {
      [perm[k], perm[i]] = [perm[i] as number, perm[k] as number];
      visit(k + 1);
      [perm[k], perm[i]] = [perm[i] as number, perm[k] as number];
    }
  };
  visit(0);
  let sum = 0;
  return counts.map((c) => (sum += c) / total);
}

describe("kendallUpperTail", () => {
  it("the @example: counts of permutations of 4 by inversions are 1, 3, 5, 6, 5, 3, 1 (Mahonian numbers, OEIS A008302, from memory)", () => {
    expect(Array.from(kendallUpperTail(4), (p) => Math.round(p * 24))).toEqual([1, 4, 9, 15, 20, 23, 24]);
  });

  it("n = 5 upper tails P(S ≥ 10, 8, 6, 4, 2) = .008, .042, .117, .242, .408 (Kendall, Rank Correlation Methods, 1975, Appendix Table 1, from memory)", () => {
    const tail = kendallUpperTail(5);
    expect(Array.from(tail.subarray(0, 5), (p) => p.toFixed(3))).toEqual(["0.008", "0.042", "0.117", "0.242", "0.408"]);
  });

  it("equals the distribution of S over all n! orders for n = 1 … 8 (enumeration, common practice, no source)", () => {
    for (let n = 1; n <= 8; n++) {
      const exact = kendallUpperTail(n);
      const brute = bruteTail(n);
      expect(exact.length).toBe(brute.length);
      brute.forEach((p, c) => expect(exact[c]).toBeCloseTo(p, 14));
    }
  });

  it("is symmetric, P(S ≥ s) + P(S ≥ −s + 2) = 1, and ends at 1 for n up to the exact limit", () => {
    const n = KENDALL_EXACT_MAX_N;
    const tail = kendallUpperTail(n);
    const pairs = (n * (n - 1)) / 2;
    expect(tail[pairs]).toBe(1);
    for (const c of [0, 10, 1000, Math.floor(pairs / 3)]) expect((tail[c] as number) + (tail[pairs - c - 1] as number)).toBeCloseTo(1, 9);
  });

  it("refuses n outside [1, KENDALL_EXACT_MAX_N] naming n", () => {
    expectLeewayError(() => kendallUpperTail(0), "E_OPTION", "n", "0");
    expectLeewayError(() => kendallUpperTail(KENDALL_EXACT_MAX_N + 1), "E_OPTION", "n");
    expectLeewayError(() => kendallUpperTail(2.5), "E_OPTION", "n");
  });
});
