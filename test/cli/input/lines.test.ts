import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { InputError } from "../../../packages/cli/src/exit-codes.js";
import { readLines } from "../../../packages/cli/src/input/lines.js";

async function collect(chunks: (Buffer | string)[], maxLineLength?: number): Promise<{ lines: string[]; firsts: number[] }> {
  const lines: string[] = [];
  const firsts: number[] = [];
  for await (const batch of readLines((async function* () { yield* chunks; })(), { name: "t", ...(maxLineLength === undefined ? {} : { maxLineLength }) })) {
    expect(batch.firstLine).toBe(lines.length + 1);
    firsts.push(batch.firstLine);
    lines.push(...batch.lines);
  }
  return { lines, firsts };
}

describe("readLines", () => {
  it("splitting a text into chunks anywhere gives the lines of String.split, without \\r line ends", async () => {
    const text = fc.array(fc.constantFrom("a", "b", "é", "😀", ",", "\n", "\r\n"), { maxLength: 60 }).map((parts) => parts.join(""));
    await fc.assert(
      fc.asyncProperty(text, fc.array(fc.nat(), { maxLength: 6 }), async (t, cuts) => {
        const bytes = Buffer.from(t, "utf8");
        const points = [...new Set(cuts.map((c) => c % (bytes.length + 1)))].sort((a, b) => a - b);
        const chunks: Buffer[] = [];
        let last = 0;
        for (const p of points) {
          chunks.push(bytes.subarray(last, p));
          last = p;
        }
        chunks.push(bytes.subarray(last));
        const expected = t.split("\n").map((l) => l.replace(/\r$/, ""));
        if (expected[expected.length - 1] === "") expected.pop();
        expect((await collect(chunks)).lines).toEqual(expected);
      }),
    );
  });
  it("drops a leading byte-order mark", async () => {
    expect((await collect([Buffer.from("\uFEFFscore\n1\n")])).lines).toEqual(["score", "1"]);
  });
  it("refuses a line longer than the limit, naming its line number", async () => {
    const error = await collect([Buffer.from("a\nbbbbbbbbbbbb")], 5).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(InputError);
    expect((error as Error).message).toContain("t:2: line is longer than 5 characters");
  });
});
