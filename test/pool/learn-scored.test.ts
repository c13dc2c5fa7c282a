import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { AutoencoderPool, type AutoencoderPoolOptions } from "@leeway/pool";
import { expectLeewayError } from "../support/errors.js";

const n = 12;

/** Rows around three shapes (invented), so that different members are nearest. */
function rows(count: number, seed: string): Float64Array[] {
  const random = new RandomSource(seed);
  return Array.from({ length: count }, (_, t) => Float64Array.from({ length: n }, (_, j) => Math.sin((j + 1) * (1 + (t % 3))) + 0.1 * random.normal()));
}

function filledPool(options: Partial<AutoencoderPoolOptions>): AutoencoderPool {
  const pool = new AutoencoderPool({ inputs: n, hidden: 5, maxMembers: 3, seed: "learn-scored", ...options });
  for (let m = 0; m < 3; m++) pool.addMember(rows(12, `member-${m}`), `mode-${m}`);
  return pool;
}

const SETUPS: [string, Partial<AutoencoderPoolOptions>][] = [
  ["float64, TypeScript kernel", { kernel: "typescript" }],
  ["float64, wasm-simd kernel", { kernel: "wasm-simd" }],
  ["float32", { dtype: "float32" }],
  ["shared hidden layer", { sharedHiddenLayer: true }],
  ["forgetting 0.98", { forgetting: 0.98 }],
];

describe("AutoencoderPool.learnScored: learning a scored sample without a second forward pass", () => {
  it("doc example: learnScored after score returns the loss score gave", () => {
    const pool = new AutoencoderPool({ inputs: 2, hidden: 3, maxMembers: 1, seed: 1 });
    pool.addMember([Float64Array.of(1, 0), Float64Array.of(0.9, 0.1)]);
    const { member, loss } = pool.score(Float64Array.of(1, 0.05));
    expect(pool.learnScored(member).loss).toBe(loss);
  });

  for (const [name, options] of SETUPS) {
    it(`${name}: score then learnScored(m) leaves the state and readings of score then learn(x, m), bit for bit (common practice, no source)`, () => {
      const a = filledPool(options);
      const b = filledPool(options);
      const choice = new RandomSource(`choice/${name}`);
      for (const x of rows(60, `stream/${name}`)) {
        const sa = a.score(x);
        const sb = b.score(x);
        expect(Array.from(sa.losses)).toEqual(Array.from(sb.losses));
        // the nearest member mostly, another one now and then (a known-mode switch names its member)
        const member = choice.next() < 0.8 ? sa.member : choice.integer(3);
        expect(a.scored).toBe(true);
        expect(a.learnScored(member)).toEqual(b.learn(x, member));
        expect(a.scored).toBe(false);
        expect(JSON.stringify(a.snapshot())).toBe(JSON.stringify(b.snapshot()));
      }
    });
  }

  it("without a member it learns by the nearest one of the last score", () => {
    const a = filledPool({});
    const b = filledPool({});
    for (const x of rows(20, "nearest")) {
      const nearest = a.score(x).member;
      b.score(x);
      expect(a.learnScored().member).toBe(nearest);
      b.learn(x, nearest);
    }
    expect(JSON.stringify(a.snapshot())).toBe(JSON.stringify(b.snapshot()));
  });

  it("is refused with E_STATE unless a score of a non-empty pool came directly before it, and the state is kept", () => {
    const pool = filledPool({});
    const [x, y] = rows(2, "refusals") as [Float64Array, Float64Array];
    expectLeewayError(() => pool.learnScored(0), "E_STATE", "learnScored");
    pool.score(x);
    pool.learn(y, 0);
    expectLeewayError(() => pool.learnScored(0), "E_STATE", "learnScored");
    pool.score(x);
    pool.learnScored(0);
    expectLeewayError(() => pool.learnScored(0), "E_STATE", "learnScored");
    pool.score(x);
    pool.replaceMember(1, rows(12, "replacement"));
    expectLeewayError(() => pool.learnScored(1), "E_STATE", "learnScored");
    const before = JSON.stringify(pool.snapshot());
    expectLeewayError(() => pool.learnScored(0), "E_STATE", "learnScored");
    expect(JSON.stringify(pool.snapshot())).toBe(before);
    const empty = new AutoencoderPool({ inputs: n, hidden: 5, maxMembers: 2, seed: 1 });
    empty.score(x);
    expect(empty.scored).toBe(false);
    expectLeewayError(() => empty.learnScored(), "E_STATE", "learnScored");
  });

  it("a bad member index is refused with E_OPTION naming member", () => {
    const pool = filledPool({});
    pool.score(rows(1, "bad")[0] as Float64Array);
    expectLeewayError(() => pool.learnScored(7), "E_OPTION", "member");
  });
});
