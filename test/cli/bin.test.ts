import { spawn } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";

// End-to-end: the built command, spawned with node (npm test builds it first with tsc -b).
const bin = fileURLToPath(new URL("../../packages/cli/dist/bin.js", import.meta.url));

interface Spawned {
  code: number | null;
  stdoutLines: number;
  stdoutHead: string;
  stderr: string;
}

/** Runs the built bin, streaming `lines` (a generator) into stdin with back-pressure and counting stdout lines without keeping them. */
function run(args: string[], lines?: () => Generator<string>, nodeFlags: string[] = []): Promise<Spawned> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [...nodeFlags, bin, ...args], { stdio: ["pipe", "pipe", "pipe"] });
    let stdoutLines = 0;
    let stdoutHead = "";
    let stderr = "";
    child.stdout.on("data", (chunk: Buffer) => {
      if (stdoutHead.length < 2000) stdoutHead += chunk.toString("utf8");
      for (let i = chunk.indexOf(10); i >= 0; i = chunk.indexOf(10, i + 1)) stdoutLines++;
    });
    child.stderr.on("data", (chunk: Buffer) => (stderr += chunk.toString("utf8")));
    child.on("error", reject);
    child.on("close", (code) => resolve({ code, stdoutLines, stdoutHead, stderr }));
    child.stdin.on("error", () => undefined); // the child may stop reading on an error
    if (lines === undefined) {
      child.stdin.end();
      return;
    }
    const source = lines();
    const pump = (): void => {
      let parts: string[] = [];
      for (let r = source.next(); !r.done; r = source.next()) {
        parts.push(r.value);
        if (parts.length === 4096) {
          const ok = child.stdin.write(parts.join(""));
          parts = [];
          if (!ok) {
            child.stdin.once("drain", pump);
            return;
          }
        }
      }
      child.stdin.end(parts.join(""));
    };
    pump();
  });
}

function* scoreStream(n: number): Generator<string> {
  yield "score,ref\n";
  for (let i = 0; i < n; i++) {
    const x = 0.07 * Math.exp(0.3 * Math.sin(i * 12.9898));
    yield `${x.toFixed(6)},${(1.01 * x).toFixed(6)}\n`;
  }
}

describe("leeway (spawned)", () => {
  it("the built command exists, and the committed launcher the package's bin points at runs it", async () => {
    expect(existsSync(bin), `${bin} is missing: run tsc -b (npm test does)`).toBe(true);
    const manifest = JSON.parse(readFileSync(new URL("../../packages/cli/package.json", import.meta.url), "utf8")) as { bin: Record<string, string> };
    const launcher = fileURLToPath(new URL(`../../packages/cli/${manifest.bin.leeway as string}`, import.meta.url));
    const version = await new Promise<string>((resolve, reject) => {
      const child = spawn(process.execPath, [launcher, "--version"]);
      let out = "";
      child.stdout.on("data", (c: Buffer) => (out += c.toString()));
      child.on("error", reject);
      child.on("close", () => resolve(out));
    });
    expect(version).toMatch(/^\d+\.\d+\.\d+\n$/);
  });

  it("--version exits 0; an unknown command exits 2; a missing file exits 3", async () => {
    const v = await run(["--version"]);
    expect(v.code).toBe(0);
    expect(v.stdoutHead).toMatch(/^\d+\.\d+\.\d+\n$/);
    const u = await run(["frobnicate"]);
    expect(u.code).toBe(2);
    expect(u.stderr).toContain('unknown command "frobnicate"');
    const m = await run(["replay", "/nonexistent.csv"]);
    expect(m.code).toBe(3);
  });

  it("replays a stream far larger than its heap through stdin in constant memory (heap capped at 32 MB)", async () => {
    // 400 000 rows: kept as line strings and parsed rows they would take about 55 MB of heap,
    // and their decisions (about 200 MB of NDJSON) far more; the engine and buffers need about 15 MB.
    const n = 400_000;
    const r = await run(["replay", "-", "--log", "full"], () => scoreStream(n), ["--max-old-space-size=32"]);
    expect(r.stderr.slice(0, 3000)).not.toContain("heap out of memory");
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdoutLines).toBe(n);
    expect(r.stderr).toContain(`replay: ${n} decisions written`);
  });

  it("SIGINT stops a spawned replay at its next batch: exit code 130, and stderr says it was interrupted and where the partial log is", async () => {
    const dir = mkdtempSync(join(tmpdir(), "leeway-sigint-"));
    try {
      const child = spawn(process.execPath, [bin, "replay", "-", "--out", dir], { stdio: ["pipe", "pipe", "pipe"] });
      let stderr = "";
      let signalled = false;
      const rows = [...scoreStream(100_000)];
      let next = 2001;
      // More input keeps arriving in small parts, as from a live source, until the replay stops.
      const feed = setInterval(() => {
        if (!signalled || next >= rows.length) return;
        child.stdin.write(rows.slice(next, next + 200).join(""));
        next += 200;
      }, 40);
      child.stdin.on("error", () => undefined);
      child.stderr.on("data", (chunk: Buffer) => {
        stderr += chunk.toString("utf8");
        // The layout line comes with the first batch: the replay is running; then the operator presses Ctrl-C.
        if (!signalled && stderr.includes("replay: scores mode")) {
          signalled = true;
          child.kill("SIGINT");
        }
      });
      child.stdin.write(rows.slice(0, next).join(""));
      const code = await new Promise<number | string | null>((resolve) => child.on("close", (c, s) => resolve(c ?? s)));
      clearInterval(feed);
      expect(code).toBe(130);
      expect(stderr).toMatch(/leeway: replay interrupted by SIGINT after \d+ decisions \(last good line \d+\); they are in .*decisions\.log\.partial, which is incomplete/);
      expect(existsSync(join(dir, "decisions.log.partial"))).toBe(true);
      expect(existsSync(join(dir, "decisions.log"))).toBe(false);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it("a malformed line stops the spawned replay with exit code 3 and the line named, after the good decisions", async () => {
    function* broken(): Generator<string> {
      let k = 0;
      for (const line of scoreStream(5000)) {
        yield k === 3001 ? "0.07,seven\n" : line;
        k++;
      }
    }
    const r = await run(["replay", "-", "--log", "full"], broken);
    expect(r.code).toBe(3);
    expect(r.stderr).toContain('stdin:3002:6: field 2 ("ref"): expected a number, got "seven"');
    expect(r.stdoutLines).toBe(3000);
  });

  it("no progress bar when stderr is not a terminal", async () => {
    const r = await run(["replay", "-"], () => scoreStream(2000));
    expect(r.stderr).not.toContain("\r");
  });
});
