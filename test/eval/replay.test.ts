import { describe, expect, it } from "vitest";
import { evaluate, replay, replayAsync, scoreOnly, type Pipeline } from "@leeway/eval";
import type { Decision } from "@leeway/policy";
import { expectLeewayError } from "../support/errors.js";

// A hand-made score-threshold pipeline: alarm (anomaly) while the score is above the threshold.
function thresholdPipeline(threshold: number): Pipeline<number> {
  let index = 0;
  return {
    observe(score: number): Decision {
      const high = score > threshold;
      return { index: index++, action: high ? "alarm" : "learn", cause: high ? "anomaly" : "normal", phase: "watching", evidence: { liveScore: score, referenceScores: [score] } };
    },
  };
}

const stream = [1, 1, 6, 1, 1, 1, 7, 8, 9, 1, 1, 1];
const labels = { events: [{ cause: "anomaly" as const, start: 6, end: 9 }], anomaly: stream.map((_, i) => i >= 6 && i < 9) };

describe("replay", () => {
  it("returns one decision per sample and the metrics of its timeline", () => {
    const result = replay(thresholdPipeline(5), stream, labels);
    expect(result.decisions.map((d) => d.action)).toEqual(stream.map((s) => (s > 5 ? "alarm" : "learn")));
    expect(result.timeline.length).toBe(stream.length);
    expect(result.metrics).toEqual(evaluate(result.timeline, labels));
    expect(result.metrics.perEvent[0]?.delay).toBe(0);
    expect(result.metrics.falseAlarms).toBe(1); // the spike at 2
    expect(result.metrics.scores?.live?.rocAuc).toBe(1); // the spike of 6 stays below the anomalous 7, 8, 9
  });

  it("keeps no decision objects under keepDecisions: false, with the same metrics", () => {
    const kept = replay(thresholdPipeline(5), stream, labels);
    const lean = replay(thresholdPipeline(5), stream, labels, { keepDecisions: false });
    expect(lean.decisions).toEqual([]);
    expect(lean.metrics).toEqual(kept.metrics);
  });

  it("passes maxDelay and level on to the metrics", () => {
    const late = replay(thresholdPipeline(8.5), stream, labels, { maxDelay: 2, level: 0.9 });
    expect(late.metrics.missed).toBe(1);
    expect(late.metrics.runLengths.interval.level).toBe(0.9);
  });

  it("replayAsync over an async stream gives the same result", async () => {
    async function* lines(): AsyncGenerator<number> {
      for (const s of stream) yield s;
    }
    const sync = replay(thresholdPipeline(5), stream, labels);
    const asynchronous = await replayAsync(thresholdPipeline(5), lines(), labels);
    expect(asynchronous.metrics).toEqual(sync.metrics);
    expect(asynchronous.decisions).toEqual(sync.decisions);
  });

  it("scoreOnly feeds live and reference scores to observeScores", () => {
    const calls: [number, number[] | undefined][] = [];
    const engine = {
      observeScores(live: number, references?: number[]): Decision {
        calls.push([live, references]);
        return { index: calls.length - 1, action: "learn", cause: "normal", phase: "watching", evidence: { liveScore: live, referenceScores: references ?? [live] } };
      },
    };
    const result = replay(scoreOnly(engine), [{ live: 0.2 }, { live: 0.3, references: [0.25, 0.4] }]);
    expect(calls).toEqual([
      [0.2, undefined],
      [0.3, [0.25, 0.4]],
    ]);
    expect(result.timeline.referenceScoreAt(1)).toBe(0.25);
  });

  it("refuses unknown and malformed options", () => {
    expectLeewayError(() => replay(thresholdPipeline(5), stream, labels, { keep: false } as never), "E_OPTION", "replay", "keep");
    expectLeewayError(() => replay(thresholdPipeline(5), stream, labels, { keepDecisions: "no" as never }), "E_OPTION", "keepDecisions", "no");
    expectLeewayError(() => replay(thresholdPipeline(5), stream, labels, { maxDelay: -3 }), "E_OPTION", "replay", "maxDelay", "-3");
  });
});
