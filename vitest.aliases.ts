import { fileURLToPath } from "node:url";

const packages = ["core", "stats", "change", "pool", "signal", "sim", "policy", "eval", "fleet"];
const fromRoot = (path: string): string => fileURLToPath(new URL(path, import.meta.url));

/**
 * Tests and benchmarks import the packages by name; these aliases point the
 * names at the TypeScript sources so a run never depends on a stale dist/.
 */
export const packageAliases = packages.map((name) => ({
  find: new RegExp(`^@leeway/${name}$`),
  replacement: fromRoot(`./packages/${name}/src/index.ts`),
}));
