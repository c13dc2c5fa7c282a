import { describe, expect, it } from "vitest";
import { InputError } from "../../../packages/cli/src/exit-codes.js";
import { readLines } from "../../../packages/cli/src/input/lines.js";
import { readSamples, type ReadSamplesOptions, type SampleRow, type StreamLayout } from "../../../packages/cli/src/input/samples.js";

async function read(text: string, options: Partial<ReadSamplesOptions> = {}): Promise<{ layout: StreamLayout; rows: SampleRow[] }> {
  const lines = readLines((async function* () { yield Buffer.from(text); })(), { name: "in" });
  let layout: StreamLayout | null = null;
  const rows: SampleRow[] = [];
  for await (const batch of readSamples(lines, { name: "in", ...options })) {
    layout = batch.layout;
    rows.push(...batch.rows);
  }
  return { layout: layout as StreamLayout, rows };
}

async function inputError(text: string, options: Partial<ReadSamplesOptions> = {}): Promise<string> {
  const error = await read(text, options).then(() => null, (e: unknown) => e);
  expect(error).toBeInstanceOf(InputError);
  return (error as Error).message;
}

describe("readSamples: layout", () => {
  it("a single numeric column is scores mode", async () => {
    const { layout, rows } = await read("loss\n0.1\n0.2\n");
    expect(layout.mode).toBe("scores");
    expect(layout.liveColumn).toBe("loss");
    expect(rows.map((r) => [...r.values])).toEqual([[0.1], [0.2]]);
    expect(rows.map((r) => r.line)).toEqual([2, 3]);
  });
  it("score and ref… columns are scores mode with references in header order; the time column is carried", async () => {
    const { layout, rows } = await read("time,ref_new,score,ref_comm,note\n2026-12-01T00:00:00Z,0.3,0.1,0.2,ok\n");
    expect(layout).toMatchObject({ mode: "scores", liveColumn: "score", referenceColumns: ["ref_new", "ref_comm"], timeColumn: "time", ignoredColumns: ["note"] });
    expect([...(rows[0] as SampleRow).values]).toEqual([0.1, 0.3, 0.2]);
    expect((rows[0] as SampleRow).time).toBe("2026-12-01T00:00:00Z");
  });
  it("several numeric columns are features mode; non-numeric columns are ignored", async () => {
    const { layout, rows } = await read("t,b0,b1,mode,b2\n0,1,2,low,3\n1,4,5,low,6\n");
    expect(layout).toMatchObject({ mode: "features", featureColumns: ["b0", "b1", "b2"], timeColumn: "t", ignoredColumns: ["mode"] });
    expect(rows.map((r) => [r.time, ...r.values])).toEqual([[0, 1, 2, 3], [1, 4, 5, 6]]);
  });
  it("a first line of numbers means no header: columns are named column1…", async () => {
    const { layout, rows } = await read("0.5\n0.25\n");
    expect(layout).toMatchObject({ mode: "scores", liveColumn: "column1", headerless: true });
    expect(rows.length).toBe(2);
  });
  it("skips blank lines and # comments while keeping line numbers", async () => {
    const { rows } = await read("# PS-2 scores\nscore\n\n0.1\n# pause\n0.2\n");
    expect(rows.map((r) => r.line)).toEqual([4, 6]);
  });
  it("NDJSON: scalar keys are columns, an array key gives one column per element", async () => {
    const { layout, rows } = await read('{"time":5,"x":[1,2,3],"tag":"a"}\n{"time":6,"x":[4,5,6],"tag":"b"}\n');
    expect(layout).toMatchObject({ format: "ndjson", mode: "features", featureColumns: ["x[0]", "x[1]", "x[2]"], timeColumn: "time" });
    expect(rows.map((r) => [r.time, ...r.values])).toEqual([[5, 1, 2, 3], [6, 4, 5, 6]]);
  });
  it("NDJSON scores: live and references by name", async () => {
    const { layout, rows } = await read('{"live":0.1,"ref":0.2}\n');
    expect(layout).toMatchObject({ mode: "scores", liveColumn: "live", referenceColumns: ["ref"] });
    expect([...(rows[0] as SampleRow).values]).toEqual([0.1, 0.2]);
  });
  it("a mode column is carried per record as text and is never a feature", async () => {
    const { layout, rows } = await read("t,rpm,b0,b1\n0,990,1,2\n1,1485,3,4\n", { modeColumn: "rpm" });
    expect(layout).toMatchObject({ mode: "features", modeColumn: "rpm", featureColumns: ["b0", "b1"] });
    expect(rows.map((r) => r.mode)).toEqual(["990", "1485"]);
    const nd = await read('{"speed":"low","score":0.1}\n{"speed":"mid","score":0.2}\n', { modeColumn: "speed" });
    expect(nd.rows.map((r) => r.mode)).toEqual(["low", "mid"]);
    expect(await inputError("speed,score\nlow,0.1\n,0.2\n", { modeColumn: "speed" })).toContain('in:3:1: field 1 ("speed"): expected the name of an operating mode, got an empty field');
    expect(await inputError("a,b\n1,2\n", { modeColumn: "speed" })).toContain('the mode column "speed" is not among the columns');
  });
  it("the config can force the mode, pick columns and name or drop the time column", async () => {
    expect((await read("a,b\n1,2\n", { mode: "features", columns: ["b"] })).layout.featureColumns).toEqual(["b"]);
    expect((await read("t,a,b\n1,2,3\n", { timeColumn: null })).layout.featureColumns).toEqual(["t", "a", "b"]);
    expect((await read("stamp,a\n1,2\n", { timeColumn: "stamp" })).layout).toMatchObject({ timeColumn: "stamp", liveColumn: "a" });
  });
});

describe("readSamples: malformed input names line, column and what was expected", () => {
  it("the good records before a malformed one are delivered before the error", async () => {
    const lines = readLines((async function* () { yield Buffer.from("score\n1\n2\nx\n4\n"); })(), { name: "in" });
    const seen: number[] = [];
    const error = await (async () => {
      for await (const batch of readSamples(lines, { name: "in" })) seen.push(...batch.rows.map((r) => r.values[0] as number));
    })().then(() => null, (e: unknown) => e);
    expect(seen).toEqual([1, 2]);
    expect((error as Error).message).toContain("in:4:1");
  });
  it("a non-number in a used column", async () => {
    expect(await inputError("score,ref\n0.1,0.2\n0.3,n/a\n")).toBe('in:3:5: field 2 ("ref"): expected a number, got "n/a"');
  });
  it("an empty cell", async () => {
    expect(await inputError("a,b\n1,2\n3,\n")).toBe('in:3:3: field 2 ("b"): expected a number, got an empty field');
  });
  it("a row with too few or too many fields", async () => {
    expect(await inputError("a,b\n1,2\n3\n")).toContain("in:3:2: expected 2 fields (a, b), got 1");
    expect(await inputError("a,b\n1,2\n3,4,5\n")).toContain("in:3:5: expected 2 fields (a, b), got 3");
  });
  it("a header with an empty or repeated name", async () => {
    expect(await inputError("a,,b\n1,2,3\n")).toContain("in:1:3: header field 2 is empty");
    expect(await inputError("a,b,a\n1,2,3\n")).toContain('in:1:5: column name "a" appears twice');
  });
  it("broken NDJSON, a missing key, a wrong type", async () => {
    expect(await inputError('{"score":1}\n{"score":\n')).toMatch(/^in:2:\d+: expected one JSON object per line/);
    expect(await inputError('{"score":1}\n{"other":2}\n')).toContain('in:2:1: "score": expected a number, got no such key');
    expect(await inputError('{"score":1}\n{"score":"x"}\n')).toContain('in:2:2: "score": expected a number, got "x"');
    expect(await inputError('{"x":[1,2]}\n{"x":[1]}\n')).toContain('"x": expected an array of 2 numbers, got 1 elements');
    expect(await inputError("[1,2]\n")).toContain("in:1:1");
  });
  it("empty input, a header without records, no numeric column, unknown config columns", async () => {
    expect(await inputError("")).toContain("the input is empty");
    expect(await inputError("score\n")).toContain("has a header (line 1) but no records");
    expect(await inputError("name\nabc\n")).toContain("no numeric column");
    expect(await inputError("a,b\n1,2\n", { columns: ["c"] })).toContain('the column "c" named in the config is not among the columns (a, b)');
    expect(await inputError("a,b\n1,2\n", { mode: "scores" })).toContain("scores mode needs one column");
  });
  it("reference columns without a score column are refused (a reference read as the live score would decide on the wrong model)", async () => {
    const message = await inputError("time,ref_commissioning\n0,0.1\n");
    expect(message).toContain("columns named ref… hold reference scores, but no column holds the live score; the columns are time, ref_commissioning");
    expect(message).toContain('Name the live score\'s column "score" or "live"');
    // Chosen explicitly, a reference column may be read as the score.
    expect((await read("ref_a\n0.1\n", { columns: ["ref_a"], mode: "scores" })).layout.liveColumn).toBe("ref_a");
  });
});

describe("readSamples: wide records", () => {
  it("a CSV header of 10^6 fields and an NDJSON record of 10^6 values are refused by their size, before any per-column work", async () => {
    const wide = Array.from({ length: 1_000_000 }, (_, i) => `b${i}`).join(",");
    expect(await inputError(`${wide}\n`)).toBe("in:1:1: the header has 1000000 fields; at most 65536 columns are read");
    const vector = `{"x":[${new Array(1_000_000).fill("0.5").join(",")}]}\n`;
    expect(await inputError(vector)).toBe("in:1:1: the record has 1000000 values (keys and array elements); at most 65536 columns are read");
  });
  it("a record of 60 000 features reads every column in header order (lookups by name are linear in the columns)", async () => {
    const names = Array.from({ length: 60_000 }, (_, i) => `b${i}`);
    const { layout, rows } = await read(`t,${names.join(",")}\n7,${names.map((_, i) => i % 97).join(",")}\n`);
    expect(layout.featureColumns.length).toBe(60_000);
    expect(layout.featureColumns[59_999]).toBe("b59999");
    expect((rows[0] as SampleRow).values[59_999]).toBe(59_999 % 97);
    const nd = await read(`{"t":1,"x":[${names.map((_, i) => i % 89).join(",")}]}\n`);
    expect((nd.rows[0] as SampleRow).values[59_998]).toBe(59_998 % 89);
  });
});
