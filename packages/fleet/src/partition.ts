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
  /** Id of the batch's last input entry. */
  toOffset: string;
  /** Input entries committed after this batch, in total. */
  consumed: number;
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
  engine: DecisionEngine | null;
  site: string;
  /** Why the stream is quarantined (its snapshot was refused), or null. */
  quarantined: string | null;
  latched: boolean;
  dirty: boolean;
}

/** What Redis holds for a stream when it is first seen by this owner. */
export interface StoredStream {
  snapshot: Buffer | null;
  quarantined: string | null;
}

/**
 * The engines of one partition held by one owner, and the batch step: each
 * input record becomes a decision (or an operator receipt) on the output
 * stream, or a dead letter with its reason; the plan of a batch carries the
 * changed snapshots and the new offset. No I/O here: the worker loads the
 * stored streams a batch needs ({@link PartitionEngines.missing},
 * {@link PartitionEngines.load}) and commits the plan.
 */
export class PartitionEngines {
  readonly partition: number;
  readonly token: string;
  #offset: string;
  #consumed: number;
  readonly #factory: EngineFactory;
  readonly #inputs: number | null;
  readonly #allowNonFinite: boolean;
  readonly #slots = new Map<string, StreamSlot>();
  #pending: BatchPlan | null = null;

  constructor(partition: number, token: string, offset: string, consumed: number, factory: EngineFactory, options: { inputs: number | null; allowNonFinite: boolean }) {
    this.partition = partition;
    this.token = token;
    this.#offset = offset;
    this.#consumed = consumed;
    this.#factory = factory;
    this.#inputs = options.inputs;
    this.#allowNonFinite = options.allowNonFinite;
  }

  /** Last committed input id. */
  get offset(): string {
    return this.#offset;
  }
  /** Input entries committed so far. */
  get consumed(): number {
    return this.#consumed;
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
   * Parses and decides a batch, given the stored state of the streams
   * {@link PartitionEngines.missing} named. The engines advance in memory;
   * the returned plan must be committed before the next batch, or this
   * object dropped (its engines are then ahead of Redis).
   */
  decide(entries: readonly StreamEntry[], stored: ReadonlyMap<string, StoredStream>): BatchPlan {
    if (entries.length === 0) throw new Error("PartitionEngines.decide: a batch has at least one entry");
    const plan: BatchPlan = { fromOffset: this.#offset, toOffset: (entries[entries.length - 1] as StreamEntry)[0], consumed: this.#consumed + entries.length, snapshots: [], outputs: [], dead: [], alarms: [], quarantine: [], decisions: 0 };
    const touched: StreamSlot[] = [];
    const touchedIds: string[] = [];
    for (const [id, fields] of entries) {
      const record = parseRecord(fields, this.#allowNonFinite);
      if (record.kind === "malformed") {
        plan.dead.push(deadLetter(record.stream, record.site, id, record.reason, fields));
        continue;
      }
      const slot = this.#slot(record, id, stored, plan);
      if (!slot.dirty) {
        slot.dirty = true;
        touched.push(slot);
        touchedIds.push(record.stream);
      }
      if (slot.engine === null) {
        plan.dead.push(deadLetter(record.stream, slot.site, id, `stream is quarantined: ${slot.quarantined ?? "its snapshot was refused"}`, fields));
        continue;
      }
      const problem = record.kind === "sample" ? this.#sample(slot.engine, record.values, record, id, plan) : operate(slot.engine, record.event, record.length);
      if (problem !== null) plan.dead.push(deadLetter(record.stream, slot.site, id, problem, fields));
      else if (record.kind === "operator") plan.outputs.push(["s", record.stream, "g", slot.site, "in", id, "op", record.event]);
    }
    for (let i = 0; i < touched.length; i++) {
      const slot = touched[i] as StreamSlot;
      const stream = touchedIds[i] as string;
      slot.dirty = false;
      if (slot.engine === null) continue;
      plan.snapshots.push([stream, encodeEngine(slot.engine)]);
      const latched = slot.engine.phase === "latched";
      if (latched !== slot.latched) plan.alarms.push([stream, latched ? slot.site : ""]);
      slot.latched = latched;
    }
    this.#pending = plan;
    return plan;
  }

  /** Records that `plan` (the last {@link PartitionEngines.decide}) is committed. */
  committed(plan: BatchPlan): void {
    if (plan !== this.#pending) throw new Error("PartitionEngines.committed: not the pending plan");
    this.#offset = plan.toOffset;
    this.#consumed = plan.consumed;
    this.#pending = null;
  }

  #slot(record: Exclude<InputRecord, { kind: "malformed" }>, id: string, stored: ReadonlyMap<string, StoredStream>, plan: BatchPlan): StreamSlot {
    const known = this.#slots.get(record.stream);
    if (known !== undefined) return known;
    const state = stored.get(record.stream) ?? { snapshot: null, quarantined: null };
    const slot: StreamSlot = { engine: null, site: record.site, quarantined: state.quarantined, latched: false, dirty: false };
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

  #sample(engine: DecisionEngine, values: Float64Array, record: { stream: string; time: string | null }, id: string, plan: BatchPlan): string | null {
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
    const slot = this.#slots.get(record.stream) as StreamSlot;
    const out = ["s", record.stream, "g", slot.site, "in", id, "d", JSON.stringify(decision)];
    if (record.time !== null) out.push("t", record.time);
    plan.outputs.push(out);
    plan.decisions++;
    return null;
  }
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
