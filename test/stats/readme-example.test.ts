import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import * as stats from "@leeway/stats";
import { twoPass } from "./brute-force.js";

describe("the README's usage example", () => {
  it("runs against the API exactly as written and prints the mean, std and a p99 estimate within 10^-5 of the exact quantile of its 10 000 samples", () => {
    const readme = readFileSync(fileURLToPath(new URL("../../README.md", import.meta.url)), "utf8");
    const block = /```ts\n(import \{[^}]*\} from "@leeway\/stats";[\s\S]*?)```/.exec(readme)?.[1];
    expect(block, "README has a ts block importing @leeway/stats").toBeDefined();
    const source = (block as string).replace(/^import \{([^}]*)\} from "@leeway\/stats";$/m, "const {$1} = stats;");
    const printed: unknown[][] = [];
    const console = { log: (...args: unknown[]) => printed.push(args) };
    new Function("stats", "console", source)(stats, console);
    expect(printed).toHaveLength(1);
    const [mean, std, p99] = printed[0] as [number, number, number];
    const scores = Array.from({ length: 10_000 }, (_, i) => 0.07 + 0.01 * (((i * 7919) % 10_000) / 10_000));
    const ref = twoPass(scores);
    expect(mean).toBeCloseTo(ref.mean, 14);
    expect(std).toBeCloseTo(Math.sqrt(ref.variance), 14);
    // The exact 0.99 quantile of the 10 000 scores (sorted, nearest rank; common practice, no source) is 0.0799;
    // P² (Jain & Chlamtac, 1985) lands within one level step of it, and below the largest score.
    const sorted = [...scores].sort((a, b) => a - b);
    const exact = sorted[Math.ceil(0.99 * scores.length) - 1] as number;
    expect(Math.abs(p99 - exact)).toBeLessThan(1e-5);
    expect(p99).toBeLessThan(sorted[sorted.length - 1] as number);
    // The printed comment in the README holds for these numbers.
    expect([mean.toFixed(4), std.toPrecision(3), p99.toFixed(4)]).toEqual(["0.0750", "0.00289", "0.0799"]);
  });
});
