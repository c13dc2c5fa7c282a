import { execFileSync } from "node:child_process";
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import ts from "typescript";
import { afterAll, describe, expect, it } from "vitest";

// From another project: every workspace package is packed with `npm pack`, and the tarballs are
// installed into a fresh project with `npm install --offline` (no network: the third-party run-time
// dependencies are packed from this repository's node_modules). Needs the packages built (npm test
// builds them first).
const root = fileURLToPath(new URL("../../", import.meta.url));
const work = mkdtempSync(join(tmpdir(), "leeway-pack-"));
afterAll(() => rmSync(work, { recursive: true, force: true }));

const npm = (args: string[], cwd: string): string => execFileSync("npm", args, { cwd, encoding: "utf8", env: { ...process.env, npm_config_offline: "true", npm_config_audit: "false", npm_config_fund: "false", npm_config_update_notifier: "false" } });

/** The third-party packages the workspace packages need at run time, with theirs, as installed here. */
function runtimeClosure(): string[] {
  const manifest = (path: string): { dependencies?: Record<string, string> } => JSON.parse(readFileSync(path, "utf8")) as { dependencies?: Record<string, string> };
  const todo = readdirSync(join(root, "packages")).flatMap((p) => Object.keys(manifest(join(root, "packages", p, "package.json")).dependencies ?? {})).filter((d) => !d.startsWith("@leeway/"));
  const seen = new Set<string>();
  while (todo.length > 0) {
    const d = todo.pop() as string;
    if (seen.has(d)) continue;
    seen.add(d);
    todo.push(...Object.keys(manifest(join(root, "node_modules", d, "package.json")).dependencies ?? {}));
  }
  return [...seen].sort();
}

describe("the packages from another project", () => {
  it("npm pack of every package installs into a fresh project without network; the README's embedding example and the leeway command run there", () => {
    const tarballs = join(work, "tarballs");
    mkdirSync(tarballs);
    npm(["pack", "--workspaces", "--pack-destination", tarballs, "--silent"], root);
    for (const d of runtimeClosure()) npm(["pack", "--ignore-scripts", "--silent", "--pack-destination", tarballs, join(root, "node_modules", d)], root);
    const packed = readdirSync(tarballs);
    expect(packed).toEqual(expect.arrayContaining(["leeway-core-0.1.0.tgz", "leeway-policy-0.1.0.tgz", "leeway-0.1.0.tgz"]));

    const host = join(work, "ps2-host");
    mkdirSync(host);
    writeFileSync(join(host, "package.json"), JSON.stringify({ name: "ps2-host", private: true, type: "module" }));
    npm(["install", "--ignore-scripts", ...packed.map((f) => join(tarballs, f))], host);

    // The README's embedding example, types stripped, with stand-in models: normal scores, then a jump.
    const readme = readFileSync(join(root, "README.md"), "utf8");
    const block = /```ts\n(import \{ DecisionEngine \} from "@leeway\/policy";[\s\S]*?)```/.exec(readme)?.[1] as string;
    const example = ts.transpileModule(block, { compilerOptions: { target: ts.ScriptTarget.ES2022, module: ts.ModuleKind.ESNext } }).outputText;
    writeFileSync(
      join(host, "embed.mjs"),
      `let level = 1, learnt = 0, k = 0;
const alarms = [];
const myModel = { loss: () => level * (1 + 0.1 * Math.abs(Math.sin(++k * 1.7))), learn: () => void learnt++ };
const myFrozenModel = { loss: () => level * (1 + 0.1 * Math.abs(Math.cos(k * 2.3))) };
const retrain = (done) => done();
const notifyOperator = (cause) => void alarms.push(cause);
${example}
const x = new Float64Array(4);
for (let i = 0; i < 3000; i++) onSample(x);
level = 30;
for (let i = 0; i < 200; i++) onSample(x);
console.log(JSON.stringify({ learnt, alarms }));
`,
    );
    const out = JSON.parse(execFileSync(process.execPath, ["embed.mjs"], { cwd: host, encoding: "utf8" })) as { learnt: number; alarms: string[] };
    expect(out.learnt).toBeGreaterThanOrEqual(600);
    expect(out.alarms[0]).toBe("anomaly");

    // The command, from the installed package's bin.
    const leeway = join(host, "node_modules", ".bin", "leeway");
    expect(execFileSync(leeway, ["--version"], { cwd: host, encoding: "utf8" })).toBe(`${JSON.parse(readFileSync(join(root, "packages/cli/package.json"), "utf8")).version as string}\n`);
    writeFileSync(join(host, "scores.csv"), "time,score\n" + Array.from({ length: 1500 }, (_, i) => `${i},${(0.07 * (1 + 0.1 * Math.sin(i * 0.9)) * (i > 1200 ? 9 : 1)).toFixed(5)}`).join("\n") + "\n");
    const summary = execFileSync(leeway, ["replay", "scores.csv", "--out", "run", "--sample-period", "1"], { cwd: host, encoding: "utf8", stdio: ["ignore", "pipe", "pipe"] });
    expect(summary).toContain("replayed 1500 samples");
    expect(readFileSync(join(host, "run", "report.html"), "utf8")).toContain("What needs attention");
  });
});
