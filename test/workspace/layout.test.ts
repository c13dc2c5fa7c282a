import { readdirSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";

const root = fileURLToPath(new URL("../../", import.meta.url));

// DESIGN.md, "Packages": which package may import which. Arrows only point down.
const allowed: Record<string, string[]> = {
  core: ["seedrandom"],
  stats: ["@leeway/core", "simple-statistics"],
  change: ["@leeway/core", "@leeway/stats"],
  pool: ["@leeway/core", "@leeway/stats", "ml-matrix"],
  signal: ["@leeway/core"],
  sim: ["@leeway/core", "@leeway/signal"],
  policy: ["@leeway/core", "@leeway/stats", "@leeway/change", "@leeway/pool"],
  // eval also reads sim (the decision-quality suite's scenarios) and pool (its naive baselines); see DEVELOPERS.md
  eval: ["@leeway/core", "@leeway/stats", "@leeway/change", "@leeway/pool", "@leeway/sim", "@leeway/policy"],
  // The fleet package does I/O (sockets, clocks) like the CLI; the CLI's `fleet` command runs it.
  fleet: ["@leeway/core", "@leeway/policy", "@leeway/pool", "ioredis"],
  cli: ["@leeway/core", "@leeway/stats", "@leeway/change", "@leeway/pool", "@leeway/signal", "@leeway/sim", "@leeway/policy", "@leeway/eval", "@leeway/fleet"],
};
const doesIo = ["cli", "fleet"];

function sourceFiles(dir: string): string[] {
  const out: string[] = [];
  for (const entry of readdirSync(dir)) {
    const path = join(dir, entry);
    if (statSync(path).isDirectory()) out.push(...sourceFiles(path));
    else if (path.endsWith(".ts")) out.push(path);
  }
  return out;
}

function importsOf(source: string): string[] {
  const specifiers: string[] = [];
  const pattern = /(?:import|export)\s[^;]*?from\s+["']([^"']+)["']|import\(\s*["']([^"']+)["']\s*\)/g;
  for (const match of source.matchAll(pattern)) specifiers.push((match[1] ?? match[2]) as string);
  return specifiers;
}

describe("workspace layout", () => {
  it("the README's install and test commands are the ones .ci/run runs", () => {
    const readme = readFileSync(join(root, "README.md"), "utf8");
    const block = /## Install and test\s+```sh\n([\s\S]*?)```/.exec(readme)?.[1] ?? "";
    const commands = block.trim().split("\n");
    expect(commands).toEqual(["npm ci", "npm test"]);
    const ci = readFileSync(join(root, ".ci/run"), "utf8");
    expect(ci).toMatch(/^npm ci\b/m);
    expect(ci).toMatch(/^npm test$/m);
  });

  for (const [pkg, deps] of Object.entries(allowed)) {
    it(`packages/${pkg} imports only what DESIGN.md's package table allows`, () => {
      const manifest = JSON.parse(readFileSync(join(root, "packages", pkg, "package.json"), "utf8")) as { dependencies?: Record<string, string> };
      for (const dep of Object.keys(manifest.dependencies ?? {})) expect(deps).toContain(dep);
      for (const file of sourceFiles(join(root, "packages", pkg, "src"))) {
        for (const spec of importsOf(readFileSync(file, "utf8"))) {
          if (spec.startsWith(".")) continue;
          const bare = spec.startsWith("node:") ? spec : spec.startsWith("@") ? spec.split("/").slice(0, 2).join("/") : (spec.split("/")[0] as string);
          if (doesIo.includes(pkg) && bare.startsWith("node:")) continue;
          expect(deps, `${file} imports ${spec}`).toContain(bare);
        }
      }
    });
  }

  for (const pkg of Object.keys(allowed)) {
    it(`packages/${pkg}'s manifest lists exactly the packages its sources import`, () => {
      const manifest = JSON.parse(readFileSync(join(root, "packages", pkg, "package.json"), "utf8")) as { dependencies?: Record<string, string> };
      const imported = new Set<string>();
      for (const file of sourceFiles(join(root, "packages", pkg, "src"))) {
        for (const spec of importsOf(readFileSync(file, "utf8"))) {
          if (spec.startsWith(".") || spec.startsWith("node:")) continue;
          imported.add(spec.startsWith("@") ? spec.split("/").slice(0, 2).join("/") : (spec.split("/")[0] as string));
        }
      }
      expect(Object.keys(manifest.dependencies ?? {}).sort()).toEqual([...imported].sort());
    });
  }

  it("core packages read no clock, no environment and no global randomness, and print nothing", () => {
    for (const pkg of Object.keys(allowed).filter((p) => !doesIo.includes(p))) {
      for (const file of sourceFiles(join(root, "packages", pkg, "src"))) {
        const code = readFileSync(file, "utf8").replace(/\/\*[\s\S]*?\*\/|\/\/.*$/gm, "");
        expect(code, file).not.toMatch(/Math\.random|Date\.now|new Date\(|performance\.now|process\.|console\./);
      }
    }
  });

  it("dependencies are pinned to exact versions", () => {
    const manifests = [join(root, "package.json"), ...Object.keys(allowed).map((p) => join(root, "packages", p, "package.json"))];
    for (const file of manifests) {
      const m = JSON.parse(readFileSync(file, "utf8")) as { dependencies?: Record<string, string>; devDependencies?: Record<string, string> };
      for (const [name, version] of Object.entries({ ...m.dependencies, ...m.devDependencies })) {
        expect(version, `${file}: ${name}`).toMatch(/^\d+\.\d+\.\d+$/);
      }
    }
  });
});
