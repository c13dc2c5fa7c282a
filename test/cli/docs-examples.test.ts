import { describe, expect, it } from "vitest";
import { replay, scoreOnly } from "@leeway/eval";
import { DecisionEngine, ModeRouter } from "@leeway/policy";
import { collect, harbourLane } from "@leeway/sim";
import { demoEngineOptions } from "../../packages/cli/src/commands/demo.js";
import { FIGURE_STYLE } from "../../packages/cli/src/report/html.js";
import { eventStrip, groupSeries, linePlot } from "../../packages/cli/src/report/plots.js";
import { TimelineCollector } from "../../packages/cli/src/report/timeline.js";

// The worked examples of docs/notebook.md and docs/embedding.md, run as written
// (imports from "leeway" point at the package's sources here).
describe("docs examples", () => {
  it("docs/notebook.md: replay the scenario and plot its scores", () => {
    const scale = 36; // samples per simulated hour: 6048 samples for the week
    const { spectra, truth, events } = collect(harbourLane({ scale, seed: "notebook" }));
    const router = new ModeRouter((mode) => new DecisionEngine(demoEngineOptions(scale, 256, `notebook/${mode}`)), { acknowledgeAfter: 4, confirmAfter: 4 });
    const drawn = new TimelineCollector({ columns: 800 }); // min/max per column, constant memory
    const shown = events.filter((e) => e.type !== "mode-change"); // the speed changes route the samples
    const samples = spectra.map((x, i) => ({ x, mode: truth[i]!.mode }));
    const { metrics } = replay({ observe: (s: { x: Float64Array; mode: string }) => { const d = router.observe(s.x, s.mode); drawn.add(d); return d; } }, samples, { events: shown });
    const t = drawn.result();
    const { scores, tests } = groupSeries(t.series);
    const html = `<style>${FIGURE_STYLE}</style>` + linePlot(t, { id: "ps2", title: "PS-2 scores", traces: scores, allowLog: true, markers: true, phaseLegend: true, events: shown }) + linePlot(t, { id: "ps2-test", title: tests[0]?.name ?? "change test", traces: tests[0]?.traces ?? [], events: shown }) + eventStrip(t, shown, "ps2-events");
    expect(metrics.samples).toBe(6048);
    expect(metrics.events).toBe(3);
    expect(t.count).toBe(6048);
    expect(html).toContain('data-key="liveScore"');
    expect(html).toContain('data-key="change.statistic"');
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
