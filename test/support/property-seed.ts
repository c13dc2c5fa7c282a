import { randomInt } from "node:crypto";

/**
 * The seed every fast-check property starts from in `npm test`. It is fixed
 * per commit so that CI is repeatable and a failure replays exactly; change it
 * only in a commit of its own, after a full `npm test` passes with the new value.
 */
export const FIXED_PROPERTY_SEED = 20261205;

/** How the properties of one vitest run draw their cases. */
export interface PropertySettings {
  /** fast-check seed of every property in the run. */
  seed: number;
  /** Multiplier applied to every property's number of runs (1 in `npm test`). */
  runsFactor: number;
  /** Where the seed came from, for the log line. */
  origin: "fixed" | "fresh" | "given";
}

/**
 * Reads the run's property settings from the environment:
 * `LEEWAY_PROPERTY_SEED` unset → the fixed seed; `fresh` → a newly drawn seed
 * (hunting); an integer → that seed (replaying a logged run).
 * `LEEWAY_PROPERTY_RUNS` multiplies every property's runs (default 1).
 */
export function readPropertySettings(env: NodeJS.ProcessEnv): PropertySettings {
  const runsFactor = env.LEEWAY_PROPERTY_RUNS === undefined ? 1 : Number(env.LEEWAY_PROPERTY_RUNS);
  if (!Number.isInteger(runsFactor) || runsFactor < 1) {
    throw new Error(`LEEWAY_PROPERTY_RUNS must be a positive integer, got ${JSON.stringify(env.LEEWAY_PROPERTY_RUNS)}`);
  }
  const raw = env.LEEWAY_PROPERTY_SEED;
  if (raw === undefined || raw === "") return { seed: FIXED_PROPERTY_SEED, runsFactor, origin: "fixed" };
  if (raw === "fresh") return { seed: randomInt(-(2 ** 31), 2 ** 31), runsFactor, origin: "fresh" };
  const seed = Number(raw);
  if (!Number.isInteger(seed) || seed < -(2 ** 31) || seed >= 2 ** 31) {
    throw new Error(`LEEWAY_PROPERTY_SEED must be "fresh" or a 32-bit integer, got ${JSON.stringify(raw)}`);
  }
  return { seed, runsFactor, origin: "given" };
}

/** The one log line that says how to replay the run's properties. */
export function describePropertySettings(s: PropertySettings): string {
  const runs = s.runsFactor === 1 ? "" : ` LEEWAY_PROPERTY_RUNS=${s.runsFactor}`;
  return `fast-check: every property runs from seed ${s.seed} (${s.origin}), runs ×${s.runsFactor}; replay with LEEWAY_PROPERTY_SEED=${s.seed}${runs} npx vitest run <file>`;
}
