import fc from "fast-check";
import { DecisionEngine } from "@leeway/policy";
import type { FuzzSubject } from "../probe.js";

/** One step of a host: a sample (scores, or a spectrum in feature mode) or an operator call. */
export type EngineStep =
  | { op: "scores"; live: number; references: number[] }
  | { op: "features"; x: number[] }
  | { op: "acknowledge" | "confirm" | "reject" | "commission" | "replaced" | "site-shift" };

const SMALL = { commissioning: 30, calibration: 20, settling: 20, settlingLimit: 60, trendBlock: 3, trendWindow: 12, trendMinBlocks: 4, coolDown: 15, targetArl0: 200, calibrationReplicates: 10 } as const;

/** Levels that stay, jump, creep up and spike, as a score stream does. */
const levels = (length: number): fc.Arbitrary<number[]> =>
  fc.tuple(fc.double({ min: 0.05, max: 5, noNaN: true }), fc.constantFrom(0, 0.5, 3), fc.integer({ min: 0, max: 1000 })).map(([base, jump, seed]) => {
    let wave = seed + 1;
    return Array.from({ length }, (_, t) => {
      wave = (wave * 1103515245 + 12345) % 2147483648;
      const noise = 0.2 * (wave / 2147483648 - 0.5);
      const level = base * (t > length / 2 ? 1 + jump : 1) * (t % 37 === 36 ? 20 : 1);
      return level * (1 + noise);
    });
  });

const operatorCall = fc.constantFrom<EngineStep>({ op: "acknowledge" }, { op: "confirm" }, { op: "reject" }, { op: "commission" }, { op: "replaced" }, { op: "site-shift" });

const interleave = (samples: EngineStep[], calls: (EngineStep | null)[]): EngineStep[] =>
  samples.flatMap((s, i) => {
    const call = calls[i % calls.length] ?? null;
    return call === null ? [s] : [s, call];
  });

const callPattern = fc.array(fc.option(operatorCall, { freq: 6 }), { minLength: 5, maxLength: 20 });

function operate(engine: DecisionEngine, step: EngineStep): unknown {
  switch (step.op) {
    case "scores":
      return engine.observeScores(step.live, step.references);
    case "features":
      // a vector of numbers travels as the Float64Array the engine takes; anything else goes as it is,
      // so that the engine, not Float64Array.from, meets a non-number (from(["5", false]) would be [5, 0])
      return engine.observe(Array.isArray(step.x) && step.x.every((v) => typeof v === "number") ? Float64Array.from(step.x) : (step.x as never));
    case "acknowledge":
      if (engine.phase === "latched") engine.acknowledge();
      return engine.phase;
    case "confirm":
      if (engine.awaitingConfirmation) engine.confirmRetrain();
      return engine.phase;
    case "reject":
      if (engine.awaitingConfirmation) engine.rejectRetrain();
      return engine.phase;
    case "commission":
      if (engine.phase !== "commissioning") engine.startCommissioning(20);
      return engine.phase;
    case "replaced":
      if (engine.mode === "scores" && engine.phase === "retraining") engine.modelReplaced();
      return engine.phase;
    case "site-shift":
      engine.reportSiteShift(); // never refused: what it did shows in the next decision's evidence
      return engine.phase;
  }
}

const place = (step: EngineStep, value: unknown, at: number): unknown | null => {
  if (step.op === "scores") {
    if (at < 0 || step.references.length === 0) return { ...step, live: value };
    const references: unknown[] = [...step.references];
    references[at % references.length] = value;
    return { ...step, references };
  }
  if (step.op === "features") {
    const x: unknown[] = [...step.x];
    if (at < 0) return { op: "features", x: value };
    x[at % x.length] = value;
    return { op: "features", x };
  }
  return null;
};

/** The decision engine on scores from the host's own models, with operator calls in between. */
export const scoreEngineSubject: FuzzSubject<DecisionEngine, EngineStep> = {
  name: "DecisionEngine (scores)",
  setup: fc.record({
    options: fc.record({ retrain: fc.constantFrom("auto", "confirm", "never"), seed: fc.integer({ min: 0, max: 1000 }), nonFinite: fc.constantFrom("refuse", "skip") }).map((o) => ({ ...SMALL, ...o })),
    inputs: fc.tuple(fc.integer({ min: 60, max: 140 }), fc.integer({ min: 0, max: 2 })).chain(([length, refs]) =>
      fc.tuple(levels(length), callPattern).map(([live, calls]) => interleave(live.map((v, t): EngineStep => ({ op: "scores", live: v, references: Array.from({ length: refs }, (_, k) => v * (1 + 0.05 * (k + 1) * Math.sin(t))) })), calls)),
    ),
  }),
  create: (o) => new DecisionEngine(o as never),
  feed: operate,
  snapshot: (c) => c.snapshot(),
  restore: DecisionEngine.restore,
  place,
};

/** The decision engine with its own pool, on small feature vectors. */
export const featureEngineSubject: FuzzSubject<DecisionEngine, EngineStep> = {
  name: "DecisionEngine (features)",
  setup: fc.record({
    options: fc.record({ retrain: fc.constantFrom("auto", "confirm"), seed: fc.integer({ min: 0, max: 1000 }), members: fc.integer({ min: 1, max: 2 }) }).map((o) => ({ ...SMALL, ...o, inputs: 4, hidden: 3 })),
    inputs: fc.tuple(fc.integer({ min: 60, max: 110 }), callPattern).chain(([length, calls]) =>
      levels(length).map((live) => interleave(live.map((v, t): EngineStep => ({ op: "features", x: [v, 0.5 * v, Math.sin(t), 1 + 0.1 * Math.cos(3 * t)] })), calls)),
    ),
  }),
  create: (o) => new DecisionEngine(o as never),
  feed: operate,
  snapshot: (c) => c.snapshot(),
  restore: DecisionEngine.restore,
  place,
};

export const policySubjects = [scoreEngineSubject, featureEngineSubject];
