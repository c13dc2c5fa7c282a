import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import * as stats from "@leeway/stats";
import { twoPass } from "./brute-force.js";

describe("the README's usage example", () => {
  it("runs against the API exactly as written and prints the mean, std and p99 estimate", () => {
    const readme = readFileSync(fileURLToPath(new URL("../../README.md", import.meta.url)), "utf8");
    const block = /```ts\n(import \{[^}]*\} from "@leeway\/stats";[\s\S]*?)```/.exec(readme)?.[1];
    expect(block, "README has a ts block importing @leeway/stats").toBeDefined();
    const source = (block as string).replace(/^import \{([^}]*)\} from "@leeway\/stats";$/m, "const {$1} = stats;");
    const printed: unknown[][] = [];
    const console = { log: (...args: unknown[]) => printed.push(args) };
    new Function("stats", "console", source)(stats, console);
    expect(printed).toHaveLength(1);
    const [mean, std, p99] = printed[0] as number[];
    const scores = [0.071, 0.069, 0.074, 0.07, 0.093, 0.072, 0.068];
    const ref = twoPass(scores);
    expect(mean).toBeCloseTo(ref.mean, 15);
    expect(std).toBeCloseTo(Math.sqrt(ref.variance), 15);
    // With seven samples P² can only say the p99 marker lies within the samples seen.
    expect(p99).toBeGreaterThanOrEqual(Math.min(...scores));
    expect(p99).toBeLessThanOrEqual(Math.max(...scores));
  });
});
