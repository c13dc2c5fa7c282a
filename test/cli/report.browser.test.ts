import { execFileSync } from "node:child_process";
import { mkdirSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { chromium } from "playwright-core";
import { afterAll, describe, expect, it } from "vitest";
import { runCli, scratchDir } from "./run-cli.js";

// Debian's chromium, driven by playwright-core; never a downloaded browser.
const executablePath = execFileSync("which", ["chromium"], { encoding: "utf8" }).trim();
const FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking", "--disable-component-update", "--disable-sync", "--no-first-run"];
const artifacts = fileURLToPath(new URL("../../test-results/", import.meta.url));
const profile = mkdtempSync(join(tmpdir(), "leeway-chromium-"));
afterAll(() => rmSync(profile, { recursive: true, force: true }));

describe("the demo's report in a real browser", () => {
  it("opens without console errors, every plot draws something, and a screenshot is saved", async () => {
    const dir = scratchDir("browser");
    const demo = await runCli(["demo", "--scale", "6", "--out", dir]);
    expect(demo.code, demo.stderr).toBe(0);

    const context = await chromium.launchPersistentContext(profile, { executablePath, headless: true, args: FLAGS, viewport: { width: 1400, height: 1000 } });
    try {
      const page = await context.newPage();
      const problems: string[] = [];
      page.on("console", (m) => {
        if (m.type() === "error") problems.push(`console: ${m.text()}`);
      });
      page.on("pageerror", (e) => problems.push(`page error: ${e.message}`));
      page.on("request", (r) => {
        if (!r.url().startsWith("file:")) problems.push(`request: ${r.url()}`);
      });
      await page.goto(pathToFileURL(join(dir, "report.html")).href, { waitUntil: "load" });

      // Runs in the page (a string, as the tests are type-checked without the DOM library).
      const plots = (await page.evaluate(`[...document.querySelectorAll("figure.plot")].map((figure) => {
        const marks = [...figure.querySelectorAll("svg path.trace, svg rect.cause-mark, svg rect.event, svg path.marker")];
        const drawn = marks.filter((m) => { const box = m.getBBox(); return box.width > 0 || box.height > 0; });
        return { id: figure.id, marks: marks.length, drawn: drawn.length, width: figure.querySelector("svg").getBoundingClientRect().width };
      })`)) as { id: string; marks: number; drawn: number; width: number }[];
      expect(plots.map((p) => p.id)).toEqual(expect.arrayContaining(["plot-scores", "plot-causes", "plot-events"]));
      for (const p of plots) {
        expect(p.drawn, `${p.id} draws nothing`).toBeGreaterThan(0);
        expect(p.width, `${p.id} has no width`).toBeGreaterThan(600);
      }
      const footer = await page.textContent("footer");
      expect(footer).toContain("not a safety function");

      mkdirSync(artifacts, { recursive: true });
      await page.screenshot({ path: join(artifacts, "demo-report.png"), fullPage: true });
      expect(problems).toEqual([]);
    } finally {
      await context.close();
    }
  });
});
