import fc from "fast-check";
import { it } from "vitest";
import { LeewayError, type Snapshot } from "@leeway/core";
import { Adwin, Cusum, EwmaChart, PageHinkley, SlidingKsTest, restoreChangeTest, type ChangeTest } from "@leeway/change";
import { Framer } from "@leeway/signal";
import { emptyCensus, probeMutation, throughJson, type Census, type FuzzSubject } from "../test/fuzz/probe.js";
import { FUZZ_SUBJECTS } from "../test/fuzz/subjects/index.js";

// The probes of issue 16 for extreme finite values, outside the pool (whose
// probes are in pool-probes.bench.ts):
// 1. A finite extreme sample on a running change test: Cusum and PageHinkley
//    take 1e308, EwmaChart 1e308, Adwin 1e200. Each must be refused with the
//    state unchanged, or leave finite readings and a restorable snapshot.
// 2. Truncated buffers: a Framer snapshot taken mid-frame and a SlidingKsTest
//    snapshot with their buffers one element short must be refused.
// 3. Finite but absurd values in a snapshot: every number of the state of
//    every snapshot-bearing component outside the policy set to +1e308 and to
//    -1e308 in turn (one at a time, five set-ups each, cut in the middle of
//    the stream). Each must be refused with E_SNAPSHOT, or be harmless (the
//    rest of the stream gives finite readings and a restorable snapshot).
// Run: npm run bench -- bench/extreme-probes.bench.ts (figures in docs/reliability.md).

const SETUPS = 5;
const ABSURD = [1e308, -1e308] as const;

/** Every path to a number in `node`. */
function numberPaths(node: unknown, prefix: (string | number)[] = []): (string | number)[][] {
  if (typeof node === "number") return [prefix];
  if (Array.isArray(node)) return node.flatMap((child, i) => numberPaths(child, [...prefix, i]));
  if (typeof node === "object" && node !== null) return Object.entries(node).flatMap(([k, child]) => numberPaths(child, [...prefix, k]));
  return [];
}

function setAt(snapshot: Snapshot, path: (string | number)[], value: number): string {
  let parent = snapshot.state as Record<string | number, unknown>;
  for (const p of path.slice(0, -1)) parent = parent[p] as Record<string | number, unknown>;
  const key = path[path.length - 1] as string | number;
  const was = parent[key];
  parent[key] = value;
  return `state.${path.join(".")}: ${String(was)} → ${value}`;
}

/** Sweeps ±1e308 over every number of the subject's snapshot. */
function absurdSweep(s: FuzzSubject<unknown, unknown>): { census: Census; examples: string[] } {
  const tally = emptyCensus();
  const examples: string[] = [];
  for (const setup of fc.sample(s.setup, { numRuns: SETUPS, seed: 16 })) {
    const cut = setup.inputs.length >> 1;
    const probe = s.create(setup.options);
    for (let i = 0; i < cut; i++) s.feed(probe, setup.inputs[i]);
    const paths = numberPaths(throughJson(s.snapshot(probe)).state);
    for (const path of paths) {
      for (const value of ABSURD) {
        const outcome = probeMutation(s, setup, cut, (snapshot) => setAt(snapshot, path, value));
        tally[outcome.verdict]++;
        if ((outcome.verdict === "wrong" || outcome.verdict === "crashed") && examples.length < 3) examples.push(outcome.detail);
      }
    }
  }
  return { census: tally, examples };
}

/** A finite extreme into a running change test: refused with the state unchanged, or finite readings and a restorable snapshot. */
function extremeSample(make: () => ChangeTest, value: number): string {
  const test = make();
  for (let i = 0; i < 50; i++) test.observe(0.1 * Math.sin(i));
  const before = JSON.stringify(test.snapshot());
  try {
    const reading = test.observe(value);
    if (!Number.isFinite(reading.statistic)) return `accepted wrongly: statistic ${reading.statistic}`;
  } catch (error) {
    if (!(error instanceof LeewayError)) return `crashed: ${String(error)}`;
    return JSON.stringify(test.snapshot()) === before ? `refused (${error.code})` : "crashed: refused but the state changed";
  }
  try {
    restoreChangeTest(throughJson(test.snapshot()));
  } catch (error) {
    return `accepted wrongly: its own snapshot was refused: ${String(error)}`;
  }
  for (let i = 0; i < 50; i++) if (!Number.isFinite(test.observe(0.1).statistic)) return "accepted wrongly: a later reading is non-finite";
  return "accepted, finite and restorable";
}

/** A restore of a snapshot with one buffer made one element shorter: must be refused. */
function truncated(snapshot: Snapshot, field: string, restore: (s: unknown) => unknown): string {
  const damaged = throughJson(snapshot) as Snapshot<Record<string, unknown>>;
  const buffer = damaged.state[field];
  if (!Array.isArray(buffer) || buffer.length === 0) return `no ${field} buffer to shorten`;
  buffer.pop();
  try {
    restore(damaged);
    return `accepted wrongly (${field} one short)`;
  } catch (error) {
    return error instanceof LeewayError && error.code === "E_SNAPSHOT" ? `refused: ${error.message}` : `crashed: ${String(error)}`;
  }
}

it("extreme finite values: samples, truncated buffers and absurd snapshot values", () => {
  console.log("\n1. finite extreme samples into running change tests");
  const samples: [string, () => ChangeTest, number][] = [
    ["Cusum.observe(1e308)", () => new Cusum({ mean: 0, sigma: 1 }), 1e308],
    ["PageHinkley.observe(1e308)", () => new PageHinkley({ alarmLevel: 5 }), 1e308],
    ["EwmaChart.observe(1e308)", () => new EwmaChart({ mean: 0, sigma: 1 }), 1e308],
    ["Adwin.observe(1e200)", () => new Adwin(), 1e200],
  ];
  for (const [name, make, value] of samples) console.log(`  ${name.padEnd(30)} ${extremeSample(make, value)}`);

  console.log("\n2. truncated buffers");
  const framer = new Framer({ size: 8, hop: 4 });
  for (let i = 0; i < 11; i++) framer.observe(i);
  const framerSnapshot = framer.snapshot() as unknown as Snapshot<Record<string, unknown>>;
  for (const field of Object.keys(framerSnapshot.state).filter((k) => Array.isArray(framerSnapshot.state[k]))) {
    console.log(`  Framer ${field.padEnd(23)} ${truncated(framerSnapshot, field, Framer.restore)}`);
  }
  const ks = new SlidingKsTest({ recentSize: 8, referenceSize: 8 });
  for (let i = 0; i < 30; i++) ks.observe(Math.sin(i));
  const ksSnapshot = ks.snapshot() as unknown as Snapshot<Record<string, unknown>>;
  for (const field of Object.keys(ksSnapshot.state).filter((k) => Array.isArray(ksSnapshot.state[k]))) {
    console.log(`  SlidingKsTest ${field.padEnd(16)} ${truncated(ksSnapshot, field, SlidingKsTest.restore)}`);
  }

  console.log("\n3. ±1e308 in every number of a snapshot (tried / refused / accepted / wrong / crashed)");
  for (const s of FUZZ_SUBJECTS.filter((x) => !x.name.startsWith("DecisionEngine"))) {
    const { census: c, examples } = absurdSweep(s);
    const tried = c.refused + c.accepted + c.wrong + c.crashed;
    console.log(`  ${s.name.padEnd(22)} ${[tried, c.refused, c.accepted, c.wrong, c.crashed].map((n) => String(n).padStart(5)).join(" /")}${examples.length > 0 ? `\n      e.g. ${examples[0]?.slice(0, 300)}` : ""}`);
  }
});
