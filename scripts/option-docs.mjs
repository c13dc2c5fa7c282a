// Writes the option tables of the components into the guides, between
// <!-- options:NAME:begin --> and <!-- options:NAME:end --> markers, from the
// components' own option tables (run after `npm run build`):
//   node scripts/option-docs.mjs
// test/workspace/option-docs.test.ts fails when a guide's table is stale.
import { readFileSync, writeFileSync } from "node:fs";

/** One markdown table of option rows (OptionDescription of @leeway/core). */
export function optionsMarkdown(rows) {
  const lines = ["| option | kind | default | allowed | unit | meaning |", "|---|---|---|---|---|---|"];
  for (const r of rows) {
    const cell = (t) => t.replace(/\|/g, "\\|");
    lines.push(`| \`${r.name}\` | ${r.kind} | \`${JSON.stringify(r.default)}\` | ${cell(r.allowed)} | ${r.unit} | ${cell(r.doc)} |`);
  }
  return lines.join("\n");
}

/** Replaces the block between the markers of `name` in `text`. */
export function withBlock(text, name, table) {
  const begin = `<!-- options:${name}:begin -->`;
  const end = `<!-- options:${name}:end -->`;
  const a = text.indexOf(begin);
  const b = text.indexOf(end);
  if (a < 0 || b < a) throw new Error(`markers of ${name} not found`);
  return `${text.slice(0, a + begin.length)}\n${table}\n${text.slice(b)}`;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const { describeEngineOptions } = await import("@leeway/policy");
  const file = new URL("../docs/policy.md", import.meta.url);
  writeFileSync(file, withBlock(readFileSync(file, "utf8"), "engine", optionsMarkdown(describeEngineOptions())));
  console.log("docs/policy.md: engine options written");
}
