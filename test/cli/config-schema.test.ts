import { describe, expect, it } from "vitest";
import { lineColumn, locateJsonKey, parseConfigText, schemaKeys, validateConfig, type ConfigField } from "../../packages/cli/src/config-schema.js";
import { InputError } from "../../packages/cli/src/exit-codes.js";

const fields: Record<string, ConfigField> = {
  engine: {
    kind: "section",
    doc: "e",
    fields: {
      hidden: { kind: "number", unit: "units", default: 32, integer: true, min: 1, doc: "h" },
      retrain: { kind: "string", default: "auto", choices: ["auto", "confirm", "never"], doc: "r" },
    },
  },
  title: { kind: "string", default: "t", doc: "t" },
  columns: { kind: "strings", default: null, doc: "c" },
  quiet: { kind: "boolean", default: false, doc: "q" },
};

function refused(value: unknown, text = JSON.stringify(value, null, 2)): string {
  try {
    validateConfig(value, fields, "p.json", (path) => locateJsonKey(text, path));
  } catch (error) {
    expect(error).toBeInstanceOf(InputError);
    return (error as Error).message;
  }
  throw new Error("expected the config to be refused");
}

describe("validateConfig", () => {
  it("fills defaults and keeps given values", () => {
    const v = validateConfig({ engine: { hidden: 8 }, columns: ["a"] }, fields, "p.json", () => "1:1");
    expect(v).toEqual({ engine: { hidden: 8, retrain: "auto" }, title: "t", columns: ["a"], quiet: false });
  });
  it("names an unknown key with its place in the file and the nearest known key", () => {
    const text = '{\n  "engine": {\n    "hiden": 8\n  }\n}';
    expect(refused(JSON.parse(text), text)).toBe('p.json:3:5: unknown key "engine.hiden"; did you mean "engine.hidden"? (known keys of "engine": hidden, retrain)');
    expect(refused({ titel: "x" })).toContain('unknown key "titel"; did you mean "title"?');
    expect(refused({ colour: "x" })).not.toContain("did you mean");
  });
  it("names a wrong type or value with what is allowed", () => {
    expect(refused({ engine: { hidden: 0.5 } })).toContain('"engine.hidden" must be an integer >= 1, got 0.5');
    expect(refused({ engine: { retrain: "manual" } })).toContain('"engine.retrain" must be one of "auto", "confirm", "never", got "manual"');
    expect(refused({ engine: { retrain: "confrim" } })).toContain('did you mean "confirm"?');
    expect(refused({ columns: [] })).toContain("a non-empty array of non-empty strings");
    expect(refused({ quiet: "yes" })).toContain('"quiet" must be true or false');
    expect(refused({ engine: 3 })).toContain('"engine" must be a JSON object, got number');
    expect(refused([1])).toContain("the config must be a JSON object, got an array");
  });
});

describe("JSON positions", () => {
  it("lineColumn counts from 1", () => {
    expect(lineColumn("ab\ncd", 0)).toBe("1:1");
    expect(lineColumn("ab\ncd", 4)).toBe("2:2");
  });
  it("locateJsonKey finds a nested key at its own depth, not a same-named key elsewhere", () => {
    const text = '{"report": {"title": "x"},\n "engine": {\n   "title": 1}}';
    expect(locateJsonKey(text, ["engine", "title"])).toBe("3:4");
    expect(locateJsonKey(text, ["report", "title"])).toBe("1:13");
  });
  it("a syntax error is an input error with line and column", () => {
    const error = (() => {
      try {
        parseConfigText('{\n  "a": 1,\n}', "p.json");
      } catch (e) {
        return e as Error;
      }
      return null;
    })();
    expect(error).toBeInstanceOf(InputError);
    expect(error?.message).toMatch(/^p\.json:\d+:\d+: the config is not valid JSON/);
  });
});

describe("schemaKeys", () => {
  it("lists every key path, sections first", () => {
    expect(schemaKeys(fields).map((k) => k.key)).toEqual(["engine", "engine.hidden", "engine.retrain", "title", "columns", "quiet"]);
  });
});
