import { existsSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { Writable } from "node:stream";
import { describe, expect, it } from "vitest";
import { PartialFile, TextSink } from "../../packages/cli/src/io.js";
import { scratchDir } from "./run-cli.js";

describe("TextSink", () => {
  it("writes everything in order in chunks of about 64 KiB, waiting whenever the stream is full", async () => {
    const chunks: string[] = [];
    let waits = 0;
    const slow = new Writable({
      highWaterMark: 1024,
      write(chunk: Buffer, _e, done) {
        chunks.push(chunk.toString());
        setImmediate(done);
      },
    });
    const sink = new TextSink(slow);
    const lines = Array.from({ length: 20000 }, (_, i) => `line ${i}\n`);
    for (const l of lines) {
      const pending = sink.write(l);
      if (pending !== undefined) {
        waits++;
        await pending;
      }
    }
    await sink.flush();
    expect(chunks.join("")).toBe(lines.join(""));
    expect(waits).toBeGreaterThan(0);
    expect(Math.max(...chunks.map((c) => c.length))).toBeLessThan(70_000);
  });
});

describe("PartialFile", () => {
  it("is written under .partial and only appears under its name on commit", async () => {
    const dir = scratchDir("partial");
    const path = join(dir, "out", "decisions.ndjson");
    const file = await PartialFile.create(path);
    await file.sink.write("a\n");
    expect(existsSync(path)).toBe(false);
    await file.commit();
    expect(readFileSync(path, "utf8")).toBe("a\n");
    expect(existsSync(`${path}.partial`)).toBe(false);
  });
  it("abandon leaves the .partial file; discard removes it", async () => {
    const dir = scratchDir("partial2");
    const a = await PartialFile.create(join(dir, "a.txt"));
    await a.sink.write("x");
    await a.abandon();
    expect(readFileSync(join(dir, "a.txt.partial"), "utf8")).toBe("x");
    const b = await PartialFile.create(join(dir, "b.txt"));
    await b.discard();
    expect(existsSync(join(dir, "b.txt.partial"))).toBe(false);
    expect(existsSync(join(dir, "b.txt"))).toBe(false);
  });
});
