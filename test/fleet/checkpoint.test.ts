import { describe, expect, test } from "vitest";
import { DecisionEngine } from "@leeway/policy";
import { PartitionEngines, type BatchPlan, type StoredStream, type StreamEntry } from "@leeway/fleet";
import { recordedFleet, replayInProcess, SMALL_ENGINE } from "./fleet-stream.js";

/** What Redis holds for one partition, kept in memory: the commit script's effects applied by hand. */
class MemoryPartition {
  offset = "0-0";
  consumed = 0;
  checkpoint = "0-0";
  readonly snapshots = new Map<string, Buffer>();
  readonly quarantine = new Map<string, string>();
  readonly outputs: string[][] = [];
  readonly dead: string[][] = [];
  commits = 0;

  apply(plan: BatchPlan): void {
    if (plan.fromOffset !== this.offset) throw new Error(`OFFSET expected ${plan.fromOffset}, stored ${this.offset}`);
    for (const [stream, bytes] of plan.snapshots) this.snapshots.set(stream, bytes);
    this.outputs.push(...plan.outputs);
    this.dead.push(...plan.dead);
    for (const [stream, reason] of plan.quarantine) {
      this.quarantine.set(stream, reason);
      this.snapshots.delete(stream);
    }
    this.offset = plan.toOffset;
    this.consumed = plan.consumed;
    if (plan.checkpoint) this.checkpoint = plan.toOffset;
    this.commits++;
  }

  stored(ids: readonly string[]): Map<string, StoredStream> {
    return new Map(ids.map((id) => [id, { snapshot: this.snapshots.get(id) ?? null, quarantined: this.quarantine.get(id) ?? null }]));
  }

  owner(token: string, checkpointEvery: number): PartitionEngines {
    return new PartitionEngines(0, token, { offset: this.offset, consumed: this.consumed, checkpoint: this.checkpoint }, () => new DecisionEngine(SMALL_ENGINE), { inputs: null, allowNonFinite: false, checkpointEvery });
  }
}

const records = recordedFleet(6, 300, 31, 6);
const entries: StreamEntry[] = records.map((r, i) => [`${1000 + i}-0`, r.fields]);
const BATCH = 37;

function after(id: string, upTo: string | null, count: number): StreamEntry[] {
  const from = entries.findIndex(([e]) => e === id) + 1;
  const end = upTo === null ? entries.length : entries.findIndex(([e]) => e === upTo) + 1;
  return entries.slice(from, Math.min(end, from + count));
}

/** One owner's batches: replay to the committed offset, then decide and commit until `stopAfter` commits (or the end). */
function own(store: MemoryPartition, part: PartitionEngines, stopAfter = Infinity): void {
  while (part.replaying) {
    const batch = after(part.cursor === "0-0" ? "" : part.cursor, part.offset, BATCH);
    part.replay(batch, store.stored(part.missing(batch)));
  }
  for (let n = 0; n < stopAfter; n++) {
    const batch = after(part.offset === "0-0" ? "" : part.offset, null, BATCH);
    if (batch.length === 0) return;
    const plan = part.decide(batch, store.stored(part.missing(batch)));
    store.apply(plan);
    part.committed(plan);
  }
}

function decisionsPerStream(store: MemoryPartition): Map<string, string[]> {
  const out = new Map<string, string[]>();
  for (const f of store.outputs) {
    const at = f.indexOf("d");
    if (at < 0) continue;
    const stream = f[f.indexOf("s") + 1] as string;
    if (!out.has(stream)) out.set(stream, []);
    (out.get(stream) as string[]).push(f[at + 1] as string);
  }
  return out;
}

describe("checkpoints: snapshots stored every few batches, a new owner replays from the checkpoint (common practice, no source: exactly-once by an atomic commit of offset and output, state rebuilt by deterministic replay)", () => {
  test("an owner that dies between checkpoints: the next one replays the committed records without writing them again, and the output equals the in-process replay", () => {
    const expected = replayInProcess(records, SMALL_ENGINE);
    const store = new MemoryPartition();
    own(store, store.owner("1", 3), 7); // checkpoints after commits 3 and 6, then dies after commit 7
    expect(store.commits).toBe(7);
    expect(store.checkpoint).toBe(entries[6 * BATCH - 1]?.[0]);
    expect(store.offset).toBe(entries[7 * BATCH - 1]?.[0]);
    const outputsBefore = store.outputs.length;
    const next = store.owner("2", 3);
    expect(next.replaying).toBe(true);
    own(store, next, 0); // the replay alone writes nothing
    expect(next.replayed).toBe(BATCH);
    expect(next.cursor).toBe(store.offset);
    expect(store.outputs.length).toBe(outputsBefore);
    own(store, next);
    expect(decisionsPerStream(store)).toEqual(expected);
    const decidedInputs = store.outputs.filter((f) => f.includes("d")).map((f) => f[f.indexOf("in") + 1]);
    expect(new Set(decidedInputs).size).toBe(decidedInputs.length);
    expect(store.dead).toHaveLength(6);
  });

  test("a checkpoint alone (a graceful stop) stores every engine changed since the last one; the next owner has nothing to replay", () => {
    const store = new MemoryPartition();
    const first = store.owner("1", 100);
    own(store, first, 4);
    expect(store.checkpoint).toBe("0-0");
    expect(store.snapshots.size).toBe(0);
    const plan = first.checkpointPlan() as BatchPlan;
    expect(plan.checkpoint).toBe(true);
    expect([plan.fromOffset, plan.toOffset, plan.outputs.length]).toEqual([store.offset, store.offset, 0]);
    expect(plan.snapshots.map(([s]) => s).sort()).toEqual([...new Set(records.slice(0, 4 * BATCH).filter((r) => r.values !== null).map((r) => r.stream))].sort());
    store.apply(plan);
    first.committed(plan);
    expect(first.checkpointPlan()).toBeNull();
    expect(store.owner("2", 100).replaying).toBe(false);
  });

  test("with a checkpoint every batch, every commit stores the snapshots of the streams it touched and the checkpoint follows the offset", () => {
    const store = new MemoryPartition();
    const part = store.owner("1", 1);
    own(store, part, 2);
    expect(store.checkpoint).toBe(store.offset);
    expect(part.replaying).toBe(false);
    expect(store.snapshots.size).toBe(6);
  });
});
