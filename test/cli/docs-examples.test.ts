import { describe, expect, it } from "vitest";
import { replay, scoreOnly } from "@leeway/eval";
import { DecisionEngine } from "@leeway/policy";
import { collect, harbourLane } from "@leeway/sim";
import { demoEngineOptions } from "../../packages/cli/src/commands/demo.js";
import { FIGURE_STYLE } from "../../packages/cli/src/report/html.js";
import { eventStrip, groupSeries, linePlot } from "../../packages/cli/src/report/plots.js";
import { TimelineCollector } from "../../packages/cli/src/report/timeline.js";

// The worked examples of docs/notebook.md and docs/embedding.md, run as written
// (imports from "leeway" point at the package's sources here).
describe("docs examples", () => {
  it("docs/notebook.md: replay the scenario and plot its scores", () => {
    const scale = 12; // samples per simulated hour: 2016 samples for the week
    const { spectra, events } = collect(harbourLane({ scale, seed: "notebook" }));
    const engine = new DecisionEngine(demoEngineOptions(scale, 256, "notebook"));
    const drawn = new TimelineCollector({ columns: 800 });
    const { metrics } = replay({ observe: (x: Float64Array) => { const d = engine.observe(x); drawn.add(d); return d; } }, spectra, { events });
    const t = drawn.result();
    const { scores } = groupSeries(t.series);
    const shown = events.filter((e) => e.type !== "mode-change");
    const html = `<style>${FIGURE_STYLE}</style>` + linePlot(t, { id: "ps2", title: "PS-2 scores", traces: scores, allowLog: true, markers: true, phaseLegend: true, events: shown }) + eventStrip(t, shown, "ps2-events");
    expect(metrics.samples).toBe(2016);
    expect(t.count).toBe(2016);
    expect(html).toContain('data-key="liveScore"');
    expect(html).toContain("standby compressor installed");
    const live = t.series.find((s) => s.key === "liveScore");
    expect(live?.max.length).toBe(t.buckets);
  });

  it("docs/embedding.md: score-only engine fed by the host's own model", () => {
    // The host's model: here a fixed stand-in that returns a loss per sample.
    const hostScore = (i: number): number => 0.07 * (1 + 0.1 * Math.sin(i * 0.7)) * (i > 1500 ? 1.8 : 1);
    const engine = new DecisionEngine({ commissioning: 300, calibration: 200, targetArl0: 2000, seed: 7 });
    const actions = new Map<string, number>();
    for (let i = 0; i < 2500; i++) {
      const d = engine.observeScores(hostScore(i));
      actions.set(d.action, (actions.get(d.action) ?? 0) + 1);
      if (d.action === "retrain") engine.modelReplaced();
    }
    expect([...actions.values()].reduce((a, b) => a + b, 0)).toBe(2500);
    expect(actions.get("learn")).toBeGreaterThan(0);
    // The same stream through eval's score-only pipeline gives the same decisions.
    const again = new DecisionEngine({ commissioning: 300, calibration: 200, targetArl0: 2000, seed: 7 });
    const stream = Array.from({ length: 10 }, (_, i) => ({ live: hostScore(i) }));
    expect(replay(scoreOnly(again), stream).decisions.length).toBe(10);
  });
});
