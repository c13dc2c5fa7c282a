import { defineConfig } from "vitest/config";
import { packageAliases } from "./vitest.aliases.js";

// Benchmarks are plain vitest files under bench/ that time work and write
// bench/results/<package>.json. One file at a time, so timings do not compete.
// Pick some with: npm run bench -- bench/stats.bench.ts
export default defineConfig({
  resolve: { alias: packageAliases },
  test: {
    include: ["bench/**/*.bench.ts"],
    fileParallelism: false,
    testTimeout: 900_000,
    hookTimeout: 900_000,
  },
});
