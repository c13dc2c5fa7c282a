import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { InputError } from "../../../packages/cli/src/exit-codes.js";
import { csvFieldColumn, parseNumberCell, splitCsvLine } from "../../../packages/cli/src/input/csv.js";

describe("splitCsvLine", () => {
  it("splits plain and quoted fields (RFC 4180 within a line)", () => {
    expect(splitCsvLine("a,b,,c", "f", 1)).toEqual(["a", "b", "", "c"]);
    expect(splitCsvLine('time,"pump, drive end","say ""hi""",3', "f", 1)).toEqual(["time", "pump, drive end", 'say "hi"', "3"]);
    expect(splitCsvLine('"",x', "f", 1)).toEqual(["", "x"]);
  });
  it("quoting every field of any row and splitting gives the row back", () => {
    const field = fc.string({ unit: fc.constantFrom("a", ",", '"', " ", "1"), maxLength: 5 });
    fc.assert(
      fc.property(fc.array(field, { minLength: 1, maxLength: 6 }), (row) => {
        const line = row.map((f) => `"${f.replace(/"/g, '""')}"`).join(",");
        expect(splitCsvLine(line, "f", 1)).toEqual(row);
      }),
    );
  });
  it("an unclosed quote or a stray quote is an input error naming line and column", () => {
    expect(() => splitCsvLine('1,"abc', "s.csv", 7)).toThrow(InputError);
    expect(() => splitCsvLine('1,"abc', "s.csv", 7)).toThrow('s.csv:7:3: a quoted field does not close on this line');
    expect(() => splitCsvLine('1,ab"c', "s.csv", 2)).toThrow("s.csv:2:5: a double quote inside an unquoted field");
    expect(() => splitCsvLine('"a"b', "s.csv", 2)).toThrow("s.csv:2:4: expected a comma after a quoted field");
  });
});

describe("csvFieldColumn", () => {
  it("gives the 1-based column where a field starts", () => {
    const line = 'ab,"c,d",e';
    expect(csvFieldColumn(line, 0)).toBe(1);
    expect(csvFieldColumn(line, 1)).toBe(4);
    expect(csvFieldColumn(line, 2)).toBe(10);
  });
});

describe("parseNumberCell", () => {
  it("reads decimal numbers with spaces and exponents", () => {
    expect(parseNumberCell(" 0.25 ")).toBe(0.25);
    expect(parseNumberCell("-1.5e-3")).toBe(-0.0015);
    expect(parseNumberCell(".5")).toBe(0.5);
    expect(parseNumberCell("Infinity")).toBe(Infinity);
  });
  it("refuses empty cells, words and hexadecimal, octal or binary notation (NaN)", () => {
    for (const bad of ["", "  ", "n/a", "0x10", "0b1", "0o7", "1,5", "abc"]) expect(parseNumberCell(bad)).toBeNaN();
  });
  it("reads back every finite double printed by String()", () => {
    fc.assert(fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), (x) => Object.is(parseNumberCell(String(x)), x) || (x === 0 && parseNumberCell(String(x)) === 0)));
  });
});
