import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { schemaKeys } from "../../packages/cli/src/config-schema.js";
import { buildEngine, CONFIG_FIELDS, defaultConfig, ENGINE_FIELDS, parseConfig } from "../../packages/cli/src/config.js";
import { InputError } from "../../packages/cli/src/exit-codes.js";
import { CORE_OPTIONS, FEATURE_OPTIONS } from "@leeway/policy";

describe("pipeline config", () => {
  it("defaults: auto mode and time column, no engine options (the engine's defaults apply)", () => {
    const c = defaultConfig();
    expect(c.input).toEqual({ mode: "auto", time: undefined, columns: undefined, modeColumn: null });
    expect(c.engine).toEqual({});
    expect(c.report).toEqual({ title: "leeway replay", columns: 1200 });
  });
  it("passes the engine options given, and only those", () => {
    const c = parseConfig('{"engine": {"commissioning": 200, "retrain": "confirm"}, "input": {"time": "none"}}', "p.json");
    expect(c.engine).toEqual({ commissioning: 200, retrain: "confirm" });
    expect(c.input.time).toBeNull();
  });
  it("an unknown engine key is named with the nearest one suggested", () => {
    expect(() => parseConfig('{"engine": {"comissioning": 200}}', "p.json")).toThrow('p.json:1:13: unknown key "engine.comissioning"; did you mean "engine.commissioning"?');
  });
  it("a value the engine refuses becomes an input error placed at its key", () => {
    const text = '{\n "engine": {\n  "anomalyMargin": 1,\n  "anomalyExitMargin": 2\n }\n}';
    const config = parseConfig(text, "p.json");
    expect(() => buildEngine(config, null)).toThrow(InputError);
    expect(() => buildEngine(config, null)).toThrow(/^p\.json:4:3: engine\.anomalyExitMargin: /);
  });
  it("features-only engine keys are refused in scores mode, at their key", () => {
    const config = parseConfig('{"engine": {"hidden": 16}}', "p.json");
    expect(() => buildEngine(config, null)).toThrow(/p\.json:1:13: engine\.hidden: .*score-only/);
    expect(buildEngine(config, 8).mode).toBe("features");
  });
  it("docs/cli.md documents every config key (the engine's in the policy guide's option table)", () => {
    const doc = readFileSync(new URL("../../docs/cli.md", import.meta.url), "utf8");
    const policy = readFileSync(new URL("../../docs/policy.md", import.meta.url), "utf8");
    for (const { key, field } of schemaKeys(CONFIG_FIELDS)) {
      if (field.kind === "section") continue;
      if (key.startsWith("engine.")) expect(policy, key).toContain(`| \`${key.slice("engine.".length)}\` |`);
      else expect(doc, key).toContain(`\`${key}\``);
    }
  });
  it("the engine section lists exactly the engine's options, with the engine's own defaults", () => {
    expect(Object.keys(ENGINE_FIELDS).sort()).toEqual(["samplePeriod", ...CORE_OPTIONS.names, ...FEATURE_OPTIONS.names].sort());
    for (const row of [...CORE_OPTIONS.describe(), ...FEATURE_OPTIONS.describe()]) {
      const field = ENGINE_FIELDS[row.name]!;
      expect(field.kind !== "section" && field.default, row.name).toEqual(row.default);
    }
  });
  it("a string seed is accepted and a wrong-typed one refused", () => {
    expect(parseConfig('{"engine": {"seed": "ps2"}}', "p.json").engine.seed).toBe("ps2");
    expect(() => parseConfig('{"engine": {"seed": true}}', "p.json")).toThrow('"engine.seed" must be a finite number or a non-empty string');
  });
  it("every documented engine default is accepted by the engine", () => {
    // Every engine key is accepted by a features-mode engine (it would throw on an unknown option).
    const options: Record<string, unknown> = {};
    for (const [key, field] of Object.entries(ENGINE_FIELDS)) if (field.kind !== "section" && field.default !== null) options[key] = field.default;
    expect(() => buildEngine({ ...defaultConfig(), engine: options }, 4)).not.toThrow();
  });
});
