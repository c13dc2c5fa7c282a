import { mkdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import ts from "typescript";
import { afterAll, describe, expect, test, vi } from "vitest";
import { sharedRedis } from "./redis-server.js";

// Every TypeScript block of docs/fleet.md, type-checked with the test
// project's compiler options and run against a loopback redis-server (its
// URL put in place of the guide's); a `console.log(x); // y` line must print y.

const shared = sharedRedis();
const GUIDE = fileURLToPath(new URL("../../docs/fleet.md", import.meta.url));
const SCRATCH = fileURLToPath(new URL("./.guide-examples/", import.meta.url));
const GUIDE_URL = "redis://127.0.0.1:6379";
afterAll(() => rmSync(SCRATCH, { recursive: true, force: true }));

function tsBlocks(markdown: string): string[] {
  return [...markdown.matchAll(/```ts\n([\s\S]*?)```/g)].map((m) => m[1] as string);
}

function typeErrors(file: string): string[] {
  const configPath = fileURLToPath(new URL("../tsconfig.json", import.meta.url));
  const config = ts.parseJsonConfigFileContent(ts.readConfigFile(configPath, (p) => ts.sys.readFile(p)).config, ts.sys, fileURLToPath(new URL("..", import.meta.url)));
  const program = ts.createProgram([file], { ...config.options, noEmit: true, composite: false, incremental: false, declaration: false, emitDeclarationOnly: false });
  return ts.getPreEmitDiagnostics(program).map((d) => ts.flattenDiagnosticMessageText(d.messageText, "\n"));
}

function expectedPrints(code: string): string[] {
  return [...code.matchAll(/console\.log\(.*\);\s*\/\/ (.+)$/gm)].map((m) => (m[1] as string).trim());
}

describe("docs/fleet.md code examples (common practice, no source: a guide's examples run as written)", () => {
  const blocks = tsBlocks(readFileSync(GUIDE, "utf8"));
  test("the guide has TypeScript examples and every one uses openRedis, never a client built by hand", () => {
    expect(blocks.length).toBeGreaterThan(0);
    for (const code of blocks) expect(code).not.toMatch(/new (Redis|Cluster)\(/);
  });

  blocks.forEach((code, i) => {
    test(`block ${i + 1} type-checks and runs, printing what its comments say`, async () => {
      mkdirSync(SCRATCH, { recursive: true });
      const file = `${SCRATCH}block-${i + 1}.ts`;
      writeFileSync(file, code.replaceAll(GUIDE_URL, shared.server.url));
      expect(typeErrors(file)).toEqual([]);
      const printed: string[] = [];
      const spy = vi.spyOn(console, "log").mockImplementation((...args: unknown[]) => void printed.push(args.map(String).join(" ")));
      try {
        await import(/* @vite-ignore */ file);
      } finally {
        spy.mockRestore();
      }
      expect(printed).toEqual(expectedPrints(code));
    }, 120_000);
  });
});
