import fc from "fast-check";
import { LeewayError } from "@leeway/core";
import { ACTIONS, CAUSES, PHASES, DecisionEngine, type Decision } from "@leeway/policy";
import { nonFinitePaths } from "../test/fuzz/probe.js";
import { featureEngineSubject, scoreEngineSubject, type EngineStep } from "../test/fuzz/subjects/policy.js";

/**
 * The operator census: an engine takes a seeded stream and, at random points,
 * a random host call whatever its phase (acknowledge, confirm or reject a
 * retrain, start commissioning, report the model replaced, or a snapshot
 * through JSON and restore in place). A call the phase does not allow must be
 * refused with a LeewayError and change nothing; no call or sample may throw
 * anything else; every decision must be valid: the next index, an action, a
 * cause and a phase of the vocabulary, and no NaN or ±Infinity in its evidence.
 */

/** A host call made whatever the engine's phase. */
type Call = "acknowledge" | "confirm" | "reject" | "commission" | "replaced" | "site-shift" | "restore";
const CALLS: readonly Call[] = ["acknowledge", "confirm", "reject", "commission", "replaced", "site-shift", "restore"];

/** One probe: the engine's options, its samples, and a call drawn for some of them. */
interface OperatorCase {
  options: unknown;
  samples: EngineStep[];
  calls: (Call | null)[];
  commissioning: number;
}

/** What one probe counted. */
export interface OperatorTally {
  probes: number;
  decisions: number;
  callsTaken: number;
  callsRefused: number;
  invalidDecisions: number;
  unexpectedErrors: number;
  refusedButChanged: number;
  examples: string[];
}

const samplesOnly = (inputs: EngineStep[]): EngineStep[] => inputs.filter((s) => s.op === "scores" || s.op === "features");

const cases = (subject: typeof scoreEngineSubject): fc.Arbitrary<OperatorCase> =>
  subject.setup.chain((setup) => {
    const samples = samplesOnly(setup.inputs);
    return fc.record({
      options: fc.constant(setup.options),
      samples: fc.constant(samples),
      calls: fc.array(fc.option(fc.constantFrom(...CALLS), { freq: 4 }), { minLength: samples.length, maxLength: samples.length }),
      commissioning: fc.integer({ min: 5, max: 40 }),
    });
  });

function decide(engine: DecisionEngine, step: EngineStep): Decision {
  if (step.op === "scores") return engine.observeScores(step.live, step.references);
  if (step.op === "features") return engine.observe(Float64Array.from(step.x));
  throw new Error(`not a sample: ${step.op}`);
}

function call(engine: DecisionEngine, what: Call, commissioning: number): DecisionEngine {
  switch (what) {
    case "acknowledge":
      engine.acknowledge();
      return engine;
    case "confirm":
      engine.confirmRetrain();
      return engine;
    case "reject":
      engine.rejectRetrain();
      return engine;
    case "commission":
      engine.startCommissioning(commissioning);
      return engine;
    case "replaced":
      engine.modelReplaced();
      return engine;
    case "site-shift":
      engine.reportSiteShift();
      return engine;
    case "restore":
      return DecisionEngine.restore(JSON.parse(JSON.stringify(engine.snapshot())));
  }
}

/** Why a decision is not valid, or null. */
function invalid(d: Decision, index: number): string | null {
  if (d.index !== index) return `index ${d.index}, expected ${index}`;
  if (!ACTIONS.includes(d.action)) return `action ${String(d.action)}`;
  if (!CAUSES.includes(d.cause)) return `cause ${String(d.cause)}`;
  if (!PHASES.includes(d.phase)) return `phase ${String(d.phase)}`;
  if (typeof d.evidence?.liveScore !== "number" || !Array.isArray(d.evidence.referenceScores)) return "evidence without liveScore or referenceScores";
  const nonFinite = nonFinitePaths(d.evidence, "evidence");
  return nonFinite.length > 0 ? `non-finite ${nonFinite.slice(0, 2).join(", ")}` : null;
}

function describe(error: unknown): string {
  return error instanceof Error ? `${error.name}: ${error.message}` : String(error);
}

function runCase(c: OperatorCase, tally: OperatorTally): void {
  let engine = new DecisionEngine(c.options as never);
  let index = 0;
  const note = (text: string): void => {
    if (tally.examples.length < 3) tally.examples.push(text);
  };
  for (let i = 0; i < c.samples.length; i++) {
    let d: Decision;
    try {
      d = decide(engine, c.samples[i] as EngineStep);
    } catch (error) {
      tally.unexpectedErrors++;
      note(`sample ${i} threw ${describe(error)}`);
      return;
    }
    tally.decisions++;
    const why = invalid(d, index++);
    if (why !== null) {
      tally.invalidDecisions++;
      note(`sample ${i}: invalid decision (${why})`);
    }
    const what = c.calls[i] ?? null;
    if (what === null) continue;
    const before = JSON.stringify(engine.snapshot());
    try {
      engine = call(engine, what, c.commissioning);
      tally.callsTaken++;
    } catch (error) {
      if (!(error instanceof LeewayError)) {
        tally.unexpectedErrors++;
        note(`${what} after sample ${i} threw ${describe(error)}`);
        return;
      }
      tally.callsRefused++;
      if (JSON.stringify(engine.snapshot()) !== before) {
        tally.refusedButChanged++;
        note(`${what} after sample ${i} was refused (${error.code}) but changed the state`);
      }
    }
  }
}

/** Runs `runs` probes on the score-only or the feature-mode engine from `seed`. */
export function operatorCensus(mode: "scores" | "features", runs: number, seed: number): OperatorTally {
  const tally: OperatorTally = { probes: 0, decisions: 0, callsTaken: 0, callsRefused: 0, invalidDecisions: 0, unexpectedErrors: 0, refusedButChanged: 0, examples: [] };
  const subject = mode === "scores" ? scoreEngineSubject : featureEngineSubject;
  for (const c of fc.sample(cases(subject), { numRuns: runs, seed })) {
    tally.probes++;
    runCase(c, tally);
  }
  return tally;
}
