import { it } from "vitest";
import { RandomSource } from "@leeway/core";
import { EVENT_CAUSES, anomalyMask, evaluate, prAuc, replay, rocAuc, type EventCause, type LabelledEvent, type Pipeline } from "@leeway/eval";
import type { Decision } from "@leeway/policy";
import { decimate } from "@leeway/signal";
import { BenchReport, consume, nsPerOp, sumBaselineNs } from "./harness.js";

// The cheapest possible pipeline: one reused decision, its scores overwritten per sample.
function trivialPipeline(): Pipeline<number> {
  const decision: Decision = { index: 0, action: "learn", cause: "normal", phase: "watching", evidence: { liveScore: 0, referenceScores: [0] } };
  return {
    observe(score: number): Decision {
      decision.index++;
      decision.evidence.liveScore = score;
      (decision.evidence.referenceScores as number[])[0] = score;
      decision.action = score > 3.5 ? "alarm" : "learn";
      decision.cause = score > 3.5 ? "anomaly" : "normal";
      return decision;
    },
  };
}

it("eval: replay overhead and exact AUCs", () => {
  const random = new RandomSource(7);
  const n = 100_000;
  const scores = random.fillNormal(new Float64Array(n));
  const baseline = sumBaselineNs(scores);
  const report = new BenchReport("eval");

  const stream = Array.from(scores);
  const bare = nsPerOp(() => {
    const p = trivialPipeline();
    let s = 0;
    for (const x of stream) s += p.observe(x).evidence.liveScore;
    consume(s);
  }, n);
  report.add("bare loop over pipeline.observe (10^5 samples)", bare, baseline);
  const replayNs = nsPerOp(() => consume(replay(trivialPipeline(), stream, undefined, { keepDecisions: false }).metrics.falseAlarms), n, { repeats: 5 });
  report.add("replay, trivial pipeline, no labels (10^5)", replayNs, baseline, `${(replayNs / bare).toFixed(1)}x the bare loop`);

  const events: LabelledEvent[] = Array.from({ length: 20 }, (_, k) => ({ cause: EVENT_CAUSES[k % 3] as EventCause, start: 5000 * k + 1000, end: 5000 * k + 1600 }));
  const labels = { events, anomaly: anomalyMask(events, n) };
  const labelled = nsPerOp(() => consume(replay(trivialPipeline(), stream, labels, { keepDecisions: false }).metrics.falseAlarms), n, { repeats: 5 });
  report.add("replay, trivial pipeline, 20 events + anomaly labels (10^5)", labelled, baseline, "includes ROC and PR AUC of two scores");
  const timeline = replay(trivialPipeline(), stream, undefined, { keepDecisions: false }).timeline;
  report.add("evaluate alone, 20 events + anomaly labels (10^5)", nsPerOp(() => consume(evaluate(timeline, labels).falseAlarms), n, { repeats: 5 }), baseline);

  const million = random.fillNormal(new Float64Array(1_000_000));
  const flags = new Uint8Array(million.length);
  for (let i = 0; i < million.length; i++) if (random.next() < 0.05) {
    flags[i] = 1;
    million[i] = (million[i] as number) + 1.5;
  }
  const bigBaseline = sumBaselineNs(million);
  const rocNs = nsPerOp(() => consume(rocAuc(million, flags)), million.length, { repeats: 5, minMs: 300 });
  report.add("rocAuc, 10^6 scores (5 % positive)", rocNs, bigBaseline, `${((rocNs * 1e6) / 1e6).toFixed(0)} ms per call`);
  const prNs = nsPerOp(() => consume(prAuc(million, flags)), million.length, { repeats: 5, minMs: 300 });
  report.add("prAuc, 10^6 scores (5 % positive)", prNs, bigBaseline, `${((prNs * 1e6) / 1e6).toFixed(0)} ms per call`);

  const signal = random.fillNormal(new Float64Array(96_000));
  const decNs = nsPerOp(() => consume(decimate(signal, 4)[0] as number), signal.length / 4, { repeats: 5 });
  report.add("decimate by 4, 257 taps (per output sample)", decNs, baseline, "2 s at 48 kHz to 12 kHz");
  report.write();
});
