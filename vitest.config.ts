import { defineConfig } from "vitest/config";
import { packageAliases } from "./vitest.aliases.js";

export default defineConfig({
  resolve: { alias: packageAliases },
  test: {
    include: ["test/**/*.test.ts"],
    // fast-check: one seed per run, fixed in npm test (test/support/property-seed.ts), printed once.
    globalSetup: ["test/support/property-seed.global.ts"],
    setupFiles: ["test/support/property-setup.ts"],
    testTimeout: 120_000,
    hookTimeout: 120_000,
    reporters: ["default", "json"],
    outputFile: { json: "test-results/vitest.json" },
  },
});
