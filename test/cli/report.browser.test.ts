import { execFileSync } from "node:child_process";
import { mkdirSync, mkdtempSync, readFileSync, rmSync, statSync } from "node:fs";
import { createRequire } from "node:module";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { chromium, type BrowserContext, type Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { INTERNAL_NAMES } from "./report/internal-names.js";
import { runCli, scratchDir } from "./run-cli.js";

// Debian's chromium, driven by playwright-core; never a downloaded browser.
const executablePath = execFileSync("which", ["chromium"], { encoding: "utf8" }).trim();
const FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking", "--disable-component-update", "--disable-sync", "--no-first-run"];
const artifacts = fileURLToPath(new URL("../../test-results/report/", import.meta.url));
const profile = mkdtempSync(join(tmpdir(), "leeway-chromium-"));
// axe-core (from the npm registry) checks the page's accessibility; it is injected as a script into the page.
const axeSource = readFileSync(createRequire(import.meta.url).resolve("axe-core/axe.min.js"), "utf8");

let context: BrowserContext;
let page: Page;
const problems: string[] = [];

beforeAll(async () => {
  const dir = scratchDir("browser");
  const demo = await runCli(["demo", "--scale", "12", "--out", dir]);
  expect(demo.code, demo.stderr).toBe(0);
  context = await chromium.launchPersistentContext(profile, { executablePath, headless: true, args: FLAGS, viewport: { width: 1400, height: 1000 } });
  page = await context.newPage();
  page.on("console", (m) => {
    if (m.type() === "error") problems.push(`console: ${m.text()}`);
  });
  page.on("pageerror", (e) => problems.push(`page error: ${e.message}`));
  page.on("request", (r) => {
    if (!r.url().startsWith("file:")) problems.push(`request: ${r.url()}`);
  });
  await page.goto(pathToFileURL(join(dir, "report.html")).href, { waitUntil: "load" });
}, 120_000);

afterAll(async () => {
  await context?.close();
  rmSync(profile, { recursive: true, force: true });
});

describe("the demo's report in a real browser (Debian chromium)", () => {
  it("opens without console errors or requests; every panel draws paths; one screenshot per panel goes to test-results/report/", async () => {
    // Runs in the page (a string, as the tests are type-checked without the DOM library).
    const panels = (await page.evaluate(`[...document.querySelectorAll("figure.plot")].map((figure) => {
      const marks = [...figure.querySelectorAll("svg path.trace, svg rect.cause-mark, svg rect.event, svg path.marker")];
      const drawn = marks.filter((m) => { const box = m.getBBox(); return box.width > 0 || box.height > 0; });
      return { id: figure.id, marks: marks.length, drawn: drawn.length, width: figure.querySelector("svg").getBoundingClientRect().width };
    })`)) as { id: string; marks: number; drawn: number; width: number }[];
    // Three engines (one per speed), each with scores, change test and trend panels, then causes and events.
    expect(panels.map((p) => p.id)).toEqual(expect.arrayContaining(["lane-1-scores", "lane-1-change", "lane-1-trend", "lane-2-scores", "lane-3-scores", "plot-causes", "plot-events"]));
    mkdirSync(artifacts, { recursive: true });
    for (const p of panels) {
      expect(p.drawn, `${p.id} draws nothing`).toBeGreaterThan(0);
      expect(p.width, `${p.id} has no width`).toBeGreaterThan(600);
      await page.locator(`#${p.id}`).screenshot({ path: join(artifacts, `${p.id}.png`) });
    }
    await page.locator("section[aria-labelledby=h-attention]").screenshot({ path: join(artifacts, "headline.png") });
    await page.locator("section[aria-labelledby=h-events]").screenshot({ path: join(artifacts, "events.png") });
    await page.locator("section[aria-labelledby=h-metrics]").screenshot({ path: join(artifacts, "metrics.png") });
    const footer = await page.textContent("footer");
    expect(footer).toContain("not a safety function");
    expect(problems).toEqual([]);
  });

  it("its visible text holds no internal field name; the headline says what needs attention in words", async () => {
    const text = await page.innerText("body");
    for (const name of INTERNAL_NAMES) expect(text, String(name)).not.toMatch(name);
    const head = await page.innerText("section[aria-labelledby=h-attention]");
    expect(head).toMatch(/What needs attention/);
    expect(head).toMatch(/During the record: \d+ alarms/);
    expect(head).toMatch(/samples learnt during a degradation/);
  });

  it("axe-core finds no serious or critical accessibility violation", async () => {
    await page.addScriptTag({ content: axeSource });
    const violations = (await page.evaluate(`axe.run(document, { resultTypes: ["violations"] }).then((r) => r.violations.map((v) => ({ id: v.id, impact: v.impact, nodes: v.nodes.length, help: v.help })))`)) as { id: string; impact: string; nodes: number; help: string }[];
    const serious = violations.filter((v) => v.impact === "serious" || v.impact === "critical");
    expect(serious, JSON.stringify(serious)).toEqual([]);
  });

  it("prints to A4 with the print stylesheet (the PDF goes to test-results/report/)", async () => {
    const pdf = join(artifacts, "report.pdf");
    mkdirSync(artifacts, { recursive: true });
    await page.emulateMedia({ media: "print" });
    // Laid out at the A4 page's printable width (190 mm ≈ 718 CSS px), nothing sticks out sideways.
    await page.setViewportSize({ width: 718, height: 1000 });
    const overflow = (await page.evaluate(`[...document.querySelectorAll("figure.plot, table, .attention")].filter((e) => e.getBoundingClientRect().right > 718.5).map((e) => e.id || e.tagName)`)) as string[];
    await page.pdf({ path: pdf, format: "A4", printBackground: true });
    await page.emulateMedia({ media: "screen" });
    await page.setViewportSize({ width: 1400, height: 1000 });
    expect(overflow).toEqual([]);
    const head = readFileSync(pdf).subarray(0, 5).toString("latin1");
    expect(head).toBe("%PDF-");
    expect(statSync(pdf).size).toBeGreaterThan(20_000);
  });
});
