import { LeewayError, SnapshotError } from "@leeway/core";
import type { Decision, DecisionEngine } from "@leeway/policy";
import { parseRecord, type InputRecord, type OperatorEvent } from "./records.js";
import { reportSiteShift } from "./site-shift.js";
import { decodeEngine, encodeEngine } from "./stream-snapshot.js";

/** One entry of a Redis stream as ioredis returns it: `[id, [field, value, ...]]`. */
export type StreamEntry = [id: string, fields: string[]];

/** Builds a new stream's engine (every stream of a fleet gets the same options). */
export type EngineFactory = (streamId: string) => DecisionEngine;

/** Everything one batch writes, committed atomically by {@link commitBatch}. */
export interface BatchPlan {
  /** Offset before the batch (the commit refuses if Redis holds another). */
  fromOffset: string;
  /** Id of the batch's last input entry (the same as `fromOffset` for a checkpoint alone). */
  toOffset: string;
  /** Input entries committed after this batch, in total. */
  consumed: number;
  /** A checkpoint: `snapshots` hold every engine changed since the last one, and the stored checkpoint moves to `toOffset`. */
  checkpoint: boolean;
  snapshots: [stream: string, bytes: Buffer][];
  outputs: string[][];
  dead: string[][];
  /** Stream → site when its alarm opened, "" when it closed. */
  alarms: [stream: string, site: string][];
  quarantine: [stream: string, reason: string][];
  /** Decisions made in this batch (for progress counts). */
  decisions: number;
}

interface StreamSlot {
  id: string;
  engine: DecisionEngine | null;
  site: string;
  /** Why the stream is quarantined (its snapshot was refused), or null. */
  quarantined: string | null;
  latched: boolean;
  /** Touched by the batch in hand. */
  dirty: boolean;
  /** Changed since the last checkpoint (its stored snapshot is older). */
  unsaved: boolean;
}

/** What Redis holds for a stream when it is first seen by this owner. */
export interface StoredStream {
  snapshot: Buffer | null;
  quarantined: string | null;
}

/** Where a partition stands in Redis when an owner takes it. */
export interface PartitionPosition {
  /** Last committed input id. */
  offset: string;
  /** Input entries committed. */
  consumed: number;
  /** Input id at which the stored snapshots were last made whole (at or before `offset`). */
  checkpoint: string;
}

/** Options of {@link PartitionEngines}. */
export interface PartitionEnginesOptions {
  /** Feature count of feature mode, or null for score-only mode. */
  inputs: number | null;
  /** Let NaN and ±Infinity through to the engines (nonFinite "skip"). */
  allowNonFinite: boolean;
  /** Batches per checkpoint (1: every batch stores the snapshots it changed). */
  checkpointEvery: number;
}

function emptyPlan(fromOffset: string, toOffset: string, consumed: number, checkpoint: boolean): BatchPlan {
  return { fromOffset, toOffset, consumed, checkpoint, snapshots: [], outputs: [], dead: [], alarms: [], quarantine: [], decisions: 0 };
}

/**
 * The engines of one partition held by one owner, and the batch step: each
 * input record becomes a decision (or an operator receipt) on the output
 * stream, or a dead letter with its reason; the plan of a batch carries the
 * new offset, and every `checkpointEvery` batches the snapshots of the
 * engines changed since the last checkpoint. No I/O here: the worker loads
 * the stored streams a batch needs ({@link PartitionEngines.missing}) and
 * commits the plan.
 *
 * Snapshots are stored only at checkpoints, so a new owner restores the
 * engines as of the checkpoint and first *replays* the records between the
 * checkpoint and the committed offset ({@link PartitionEngines.replay}):
 * the engines are deterministic, so they arrive where the old owner's were,
 * and the decisions of those records — already on the output stream — are
 * not written again. Exactly once holds because the offset and the
 * decisions still move together in one commit.
 */
export class PartitionEngines {
  readonly partition: number;
  readonly token: string;
  #offset: string;
  #consumed: number;
  #checkpoint: string;
  /** Last input id the engines have seen (behind `#offset` while replaying). */
  #cursor: string;
  #replayed = 0;
  #batchesSinceCheckpoint = 0;
  readonly #factory: EngineFactory;
  readonly #inputs: number | null;
  readonly #allowNonFinite: boolean;
  readonly #checkpointEvery: number;
  readonly #slots = new Map<string, StreamSlot>();
  readonly #unsaved: StreamSlot[] = [];
  /** Effects found while replaying that the old owner never committed (a snapshot refused since): written with the next commit. */
  #carry: BatchPlan | null = null;
  #pending: BatchPlan | null = null;

  constructor(partition: number, token: string, position: PartitionPosition, factory: EngineFactory, options: PartitionEnginesOptions) {
    this.partition = partition;
    this.token = token;
    this.#offset = position.offset;
    this.#consumed = position.consumed;
    this.#checkpoint = position.checkpoint;
    this.#cursor = position.checkpoint;
    this.#factory = factory;
    this.#inputs = options.inputs;
    this.#allowNonFinite = options.allowNonFinite;
    this.#checkpointEvery = options.checkpointEvery;
  }

  /** Last committed input id. */
  get offset(): string {
    return this.#offset;
  }
  /** Input entries committed so far. */
  get consumed(): number {
    return this.#consumed;
  }
  /** Input id at which the stored snapshots are whole. */
  get checkpoint(): string {
    return this.#checkpoint;
  }
  /** Last input id the engines have seen: the checkpoint at first, the committed offset once the replay is done. */
  get cursor(): string {
    return this.#cursor;
  }
  /** True until the engines have replayed the records from the checkpoint to the committed offset. */
  get replaying(): boolean {
    return this.#cursor !== this.#offset;
  }
  /** Records replayed since this owner took the partition. */
  get replayed(): number {
    return this.#replayed;
  }
  /** Engines held in memory. */
  get streams(): number {
    return this.#slots.size;
  }

  /** Stream ids of `entries` whose engines are not loaded yet. */
  missing(entries: readonly StreamEntry[]): string[] {
    const out = new Set<string>();
    for (const [, fields] of entries) {
      for (let i = 0; i + 1 < fields.length; i += 2) {
        if (fields[i] === "s") {
          const id = fields[i + 1] as string;
          if (id.length > 0 && !this.#slots.has(id)) out.add(id);
          break;
        }
      }
    }
    return [...out];
  }

  /**
   * Advances the engines over records the old owner already committed (the
   * entries after {@link PartitionEngines.cursor}, up to the committed
   * offset, in order), writing nothing: their decisions are on the output
   * stream already. A snapshot refused on the way is carried into the next
   * commit.
   */
  replay(entries: readonly StreamEntry[], stored: ReadonlyMap<string, StoredStream>): void {
    if (!this.replaying) throw new Error("PartitionEngines.replay: the engines are at the committed offset already");
    const last = (entries[entries.length - 1] as StreamEntry | undefined)?.[0];
    if (last === undefined || compareIds(last, this.#offset) > 0) throw new Error(`PartitionEngines.replay: a replay batch ends at or before the committed offset ${this.#offset}`);
    this.#carry ??= emptyPlan("", "", 0, false);
    this.#run(entries, stored, emptyPlan("", "", 0, false), this.#carry);
    this.#cursor = last;
    this.#replayed += entries.length;
  }

  /**
   * Parses and decides a batch, given the stored state of the streams
   * {@link PartitionEngines.missing} named. The engines advance in memory;
   * the returned plan must be committed before the next batch, or this
   * object dropped (its engines are then ahead of Redis).
   */
  decide(entries: readonly StreamEntry[], stored: ReadonlyMap<string, StoredStream>): BatchPlan {
    if (entries.length === 0) throw new Error("PartitionEngines.decide: a batch has at least one entry");
    if (this.replaying) throw new Error("PartitionEngines.decide: the replay up to the committed offset is not finished");
    const checkpoint = this.#batchesSinceCheckpoint + 1 >= this.#checkpointEvery;
    const plan = this.#withCarry(emptyPlan(this.#offset, (entries[entries.length - 1] as StreamEntry)[0], this.#consumed + entries.length, checkpoint));
    this.#run(entries, stored, plan, plan);
    this.#cursor = plan.toOffset;
    if (checkpoint) this.#saveAll(plan);
    this.#pending = plan;
    return plan;
  }

  /**
   * A plan that writes a checkpoint alone (no new records): the snapshots of
   * every engine changed since the last one. Null when the stored snapshots
   * are whole at the committed offset already, or while replaying.
   */
  checkpointPlan(): BatchPlan | null {
    if (this.replaying || (this.#checkpoint === this.#offset && this.#unsaved.length === 0 && this.#carry === null)) return null;
    const plan = this.#withCarry(emptyPlan(this.#offset, this.#offset, this.#consumed, true));
    this.#saveAll(plan);
    this.#pending = plan;
    return plan;
  }

  /** Records that `plan` (the last {@link PartitionEngines.decide} or {@link PartitionEngines.checkpointPlan}) is committed. */
  committed(plan: BatchPlan): void {
    if (plan !== this.#pending) throw new Error("PartitionEngines.committed: not the pending plan");
    this.#offset = plan.toOffset;
    this.#consumed = plan.consumed;
    this.#carry = null;
    this.#pending = null;
    this.#batchesSinceCheckpoint++;
    if (plan.checkpoint) {
      for (const slot of this.#unsaved) slot.unsaved = false;
      this.#unsaved.length = 0;
      this.#checkpoint = plan.toOffset;
      this.#batchesSinceCheckpoint = 0;
    }
  }

  /** The carried effects of a replay go first into `plan`. */
  #withCarry(plan: BatchPlan): BatchPlan {
    const carry = this.#carry;
    if (carry === null) return plan;
    plan.outputs.push(...carry.outputs);
    plan.dead.push(...carry.dead);
    plan.alarms.push(...carry.alarms);
    plan.quarantine.push(...carry.quarantine);
    return plan;
  }

  /** Puts the snapshot of every engine changed since the last checkpoint into `plan`. */
  #saveAll(plan: BatchPlan): void {
    for (const slot of this.#unsaved) if (slot.engine !== null) plan.snapshots.push([slot.id, encodeEngine(slot.engine)]);
  }

  /**
   * Runs `entries` through the engines: decisions, receipts and dead letters
   * go to `plan`, the effects of a refused snapshot to `refusals`.
   */
  #run(entries: readonly StreamEntry[], stored: ReadonlyMap<string, StoredStream>, plan: BatchPlan, refusals: BatchPlan): void {
    const touched: StreamSlot[] = [];
    for (const [id, fields] of entries) {
      const record = parseRecord(fields, this.#allowNonFinite);
      if (record.kind === "malformed") {
        plan.dead.push(deadLetter(record.stream, record.site, id, record.reason, fields));
        continue;
      }
      const slot = this.#slot(record, id, stored, refusals);
      if (!slot.dirty) {
        slot.dirty = true;
        touched.push(slot);
      }
      if (slot.engine === null) {
        plan.dead.push(deadLetter(record.stream, slot.site, id, `stream is quarantined: ${slot.quarantined ?? "its snapshot was refused"}`, fields));
        continue;
      }
      const problem = record.kind === "sample" ? this.#sample(slot, record.values, record.time, id, plan) : operate(slot.engine, record.event, record.length);
      if (problem !== null) plan.dead.push(deadLetter(record.stream, slot.site, id, problem, fields));
      else if (record.kind === "operator") plan.outputs.push(["s", record.stream, "g", slot.site, "in", id, "op", record.event]);
    }
    for (const slot of touched) {
      slot.dirty = false;
      if (slot.engine === null) continue;
      if (!slot.unsaved) {
        slot.unsaved = true;
        this.#unsaved.push(slot);
      }
      const latched = slot.engine.phase === "latched";
      if (latched !== slot.latched) plan.alarms.push([slot.id, latched ? slot.site : ""]);
      slot.latched = latched;
    }
  }

  #slot(record: Exclude<InputRecord, { kind: "malformed" }>, id: string, stored: ReadonlyMap<string, StoredStream>, plan: BatchPlan): StreamSlot {
    const known = this.#slots.get(record.stream);
    if (known !== undefined) return known;
    const state = stored.get(record.stream) ?? { snapshot: null, quarantined: null };
    const slot: StreamSlot = { id: record.stream, engine: null, site: record.site, quarantined: state.quarantined, latched: false, dirty: false, unsaved: false };
    if (state.quarantined === null) {
      try {
        slot.engine = state.snapshot === null ? this.#factory(record.stream) : decodeEngine(state.snapshot);
        slot.latched = state.snapshot !== null && slot.engine.phase === "latched";
      } catch (error) {
        if (!(error instanceof SnapshotError)) throw error;
        // A refused snapshot: kept whole in the dead letter, the stream quarantined and alarmed once.
        slot.quarantined = `snapshot refused: ${error.message}`;
        plan.dead.push(["s", record.stream, "g", record.site, "in", id, "reason", slot.quarantined, "snapshot", (state.snapshot as Buffer).toString("base64")]);
        plan.outputs.push(["s", record.stream, "g", record.site, "in", id, "alarm", "snapshot-refused", "reason", slot.quarantined]);
        plan.quarantine.push([record.stream, slot.quarantined]);
        plan.alarms.push([record.stream, record.site]);
      }
    }
    this.#slots.set(record.stream, slot);
    return slot;
  }

  #sample(slot: StreamSlot, values: Float64Array, time: string | null, id: string, plan: BatchPlan): string | null {
    const engine = slot.engine as DecisionEngine;
    const expected = this.#inputs;
    if (expected === null ? values.length > 3 : values.length !== expected) {
      return expected === null ? `v has ${values.length} values; score-only mode takes 1 to 3 (live, commissioning, newest)` : `v has ${values.length} values; this fleet's engines take ${expected} features`;
    }
    let decision: Decision;
    try {
      decision = expected === null ? engine.observeScores(values[0] as number, values.length === 1 ? undefined : Array.from(values.subarray(1))) : engine.observe(values);
    } catch (error) {
      if (error instanceof LeewayError) return error.message;
      throw error;
    }
    const out = ["s", slot.id, "g", slot.site, "in", id, "d", JSON.stringify(decision)];
    if (time !== null) out.push("t", time);
    plan.outputs.push(out);
    plan.decisions++;
    return null;
  }
}

/** Orders Redis stream ids ("ms-seq"). */
export function compareIds(a: string, b: string): number {
  const [am, as] = a.split("-").map(Number) as [number, number];
  const [bm, bs] = b.split("-").map(Number) as [number, number];
  return am - bm || as - bs;
}

function deadLetter(stream: string, site: string, id: string, reason: string, fields: readonly string[]): string[] {
  return ["s", stream, "g", site, "in", id, "reason", reason, "record", JSON.stringify(fields)];
}

/** Applies an operator event; returns why the engine refused it, or null. */
function operate(engine: DecisionEngine, event: OperatorEvent, length: number | null): string | null {
  try {
    if (event === "acknowledge") engine.acknowledge();
    else if (event === "confirm-retrain") engine.confirmRetrain();
    else if (event === "reject-retrain") engine.rejectRetrain();
    else if (event === "model-replaced") engine.modelReplaced();
    else if (event === "start-commissioning") engine.startCommissioning(length as number);
    else reportSiteShift(engine);
    return null;
  } catch (error) {
    if (error instanceof LeewayError) return error.message;
    throw error;
  }
}
