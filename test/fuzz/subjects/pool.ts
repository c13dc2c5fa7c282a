import fc from "fast-check";
import { StateError } from "@leeway/core";
import { AutoencoderPool, FrozenModel, OselmAutoencoder } from "@leeway/pool";
import type { FuzzSubject } from "../probe.js";
import { given, nonFinite, placeInVector, vectorStream } from "./streams.js";

/** One step of a model: learn or score one vector. */
export interface VectorStep {
  op: "learn" | "score";
  x: number[];
}

const steps = (n: number): fc.Arbitrary<VectorStep[]> =>
  vectorStream(n, 8, 40).chain((xs) => fc.array(fc.constantFrom<"learn" | "score">("learn", "learn", "score"), { minLength: xs.length, maxLength: xs.length }).map((ops) => xs.map((x, i) => ({ op: ops[i] as "learn" | "score", x }))));

const modelOptions = (n: number) =>
  fc
    .record({
      inputs: fc.constant(n),
      hidden: fc.integer({ min: 1, max: 5 }),
      seed: fc.integer({ min: 0, max: 1000 }),
      activation: fc.constantFrom(undefined, "sigmoid", "tanh", "identity"),
      ridge: fc.constantFrom(undefined, 1e-3, 0.01, 1),
      forgetting: fc.constantFrom(undefined, 1, 0.999, 0.99),
      dtype: fc.constantFrom(undefined, "float64", "float32"),
      nonFinite,
    })
    .map(given);

const withSize = <T>(make: (n: number) => fc.Arbitrary<T>): fc.Arbitrary<T> => fc.integer({ min: 2, max: 6 }).chain(make);

const placeStep = (s: VectorStep, value: unknown, at: number): unknown => ({ ...s, x: placeInVector(s.x, value, at) });

/** A learn the model refuses as numerically unsafe (E_STATE, state kept) is a reading of its own, not a failure. */
function refusable(run: () => unknown): unknown {
  try {
    return run();
  } catch (error) {
    if (error instanceof StateError) return { refused: error.message };
    throw error;
  }
}

/** What a refused update may change: its counters and last reason. */
const BOOKKEEPING = ["refused", "lastRefusal", "resets"] as const;

/** The OS-ELM autoencoder: learn and score by turns. */
export const autoencoderSubject: FuzzSubject<OselmAutoencoder, VectorStep> = {
  name: "OselmAutoencoder",
  setup: withSize((n) => fc.record({ options: modelOptions(n), inputs: steps(n) })),
  create: (o) => new OselmAutoencoder(o as never),
  feed: (c, s) => refusable(() => (s.op === "learn" ? c.learn(s.x) : c.score(s.x))),
  bookkeeping: BOOKKEEPING,
  snapshot: (c) => c.snapshot(),
  restore: OselmAutoencoder.restore,
  place: placeStep,
};

/** A frozen reference model: fitted on rows, then it only scores. */
export const frozenSubject: FuzzSubject<FrozenModel, VectorStep> = {
  name: "FrozenModel",
  setup: withSize((n) => fc.record({ options: fc.record({ model: modelOptions(n), rows: vectorStream(n, 4, 12) }), inputs: steps(n) })),
  create: (o) => {
    const { model, rows } = o as { model: never; rows: number[][] };
    const m = new OselmAutoencoder(model);
    m.fit(rows);
    return FrozenModel.from(m, "fuzz");
  },
  feed: (c, s) => c.score(s.x),
  snapshot: (c) => c.snapshot(),
  restore: FrozenModel.restore,
  place: placeStep,
};

/** The multi-mode pool, starting from one fitted member; learns (spawning members) and scores. */
export const poolSubject: FuzzSubject<AutoencoderPool, VectorStep> = {
  name: "AutoencoderPool",
  setup: withSize((n) =>
    fc.record({
      options: fc.record({
        pool: fc
          .record({
            inputs: fc.constant(n),
            hidden: fc.integer({ min: 1, max: 4 }),
            maxMembers: fc.integer({ min: 1, max: 3 }),
            seed: fc.integer({ min: 0, max: 1000 }),
            spawnLoss: fc.constantFrom(undefined, 0.5, 2),
            spawnPatience: fc.constantFrom(undefined, 3),
            dtype: fc.constantFrom(undefined, "float64", "float32"),
            activation: fc.constantFrom(undefined, "sigmoid", "identity"),
            nonFinite,
          })
          .map(given),
        rows: vectorStream(n, 4, 8),
      }),
      inputs: steps(n),
    }),
  ),
  create: (o) => {
    const { pool, rows } = o as { pool: never; rows: number[][] };
    const p = new AutoencoderPool(pool);
    p.addMember(rows, "first");
    return p;
  },
  feed: (c, s) =>
    refusable(() => {
      if (s.op === "learn") return c.learn(s.x);
      const r = c.score(s.x);
      return { member: r.member, loss: r.loss, losses: Array.from(r.losses) };
    }),
  bookkeeping: BOOKKEEPING,
  snapshot: (c) => c.snapshot(),
  restore: AutoencoderPool.restore,
  place: placeStep,
};

export const poolSubjects = [autoencoderSubject, frozenSubject, poolSubject];
