import { defineConfig } from "vitest/config";
import { packageAliases } from "./vitest.aliases.js";

export default defineConfig({
  resolve: { alias: packageAliases },
  test: {
    include: ["test/**/*.test.ts"],
    testTimeout: 120_000,
    hookTimeout: 120_000,
    reporters: ["default", "json"],
    outputFile: { json: "test-results/vitest.json" },
  },
});
