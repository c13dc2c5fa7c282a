import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { describeEngineOptions } from "@leeway/policy";
// @ts-expect-error a plain ES module without type declarations
import { optionsMarkdown, withBlock } from "../../scripts/option-docs.mjs";

describe("option docs are derived from the option tables", () => {
  it("docs/policy.md lists every engine option as the engine declares it (regenerate: node scripts/option-docs.mjs)", () => {
    const text = readFileSync(new URL("../../docs/policy.md", import.meta.url), "utf8");
    const table = (optionsMarkdown as (rows: unknown) => string)(describeEngineOptions());
    expect(text).toBe((withBlock as (t: string, n: string, tb: string) => string)(text, "engine", table));
  });
});
