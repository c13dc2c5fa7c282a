import { DecisionEngine, type Decision, type DecisionEngineOptions } from "@leeway/policy";
import { defineScenario, MachineSimulator, SPEEDS, type EventSpec } from "@leeway/sim";
import { isOnset, operatorFields, PartitionEngines, sampleFields, SiteOnsets, type BatchPlan, type StoredStream, type StreamEntry } from "@leeway/fleet";

/**
 * The twenty-pump demonstration of site-wide evidence (invented): the
 * Harbour Lane pump station runs twenty pumps of the PS-2 kind at mid speed
 * (1485 rpm), one sample a minute. At sample 700 the station's shared
 * intake is switched to the new river main: the broadband noise floor of
 * every pump's drive-end bearing housing doubles, reaching the pumps over
 * about an hour (pump k at 700 + 3k). Pump 7's outer race has been wearing
 * since sample 300 (degradation, exponential growth).
 *
 * Each pump's host sends 32 band energies per frame (the simulator's 256
 * spectrum values averaged in runs of 8) to a feature-mode engine. The
 * records go through the fleet's batch step ({@link PartitionEngines}, the
 * worker's in-memory half) in rounds of {@link ROUND} samples per pump; after
 * each round the site evidence ({@link SiteOnsets} with {@link isOnset}, as
 * `SiteEvidence` runs them) reads the round's decisions and appends a
 * `site-shift` operator record to the input log of every pump it tells, so
 * the event reaches the engine at a fixed place in its log.
 */
export const PUMPS = 20;
export const SITE = "harbour-lane";
export const LENGTH = 1200;
export const SHIFT_AT = 700;
export const SHIFT_STAGGER = 3;
export const DEGRADING = 7;
export const DEGRADATION_AT = 300;
/** Samples per pump per round of the worker and of the site evidence. */
export const ROUND = 5;
const BANDS = 32;

/** The engines' options: spans in samples at one sample a minute. */
export const DEMO_ENGINE: DecisionEngineOptions = {
  inputs: BANDS,
  hidden: 6,
  members: 1,
  commissioning: 150,
  calibration: 100,
  calibrationReplicates: 20,
  targetArl0: 2000,
  settling: 40,
  settlingLimit: 150,
  trendBlock: 10,
  trendWindow: 60,
  trendMinBlocks: 30,
  trendMinRise: 1,
  baselineHalfLife: 100,
  coolDown: 50,
  retrainHorizon: 2000,
  reminder: 0,
  seed: 3,
};

/** The site evidence's settings: a fifth of the site's pumps (at least 3) with onsets within 60 samples. */
export const DEMO_SITE = { fraction: 0.2, window: 60, minStreams: 3 } as const;

export const pumpId = (k: number): string => `ps-${String(k + 1).padStart(2, "0")}`;

/** Every pump's 32 band energies per sample, simulated once. */
export function simulatePumps(): Float64Array[][] {
  const out: Float64Array[][] = [];
  for (let k = 0; k < PUMPS; k++) {
    const events: EventSpec[] = [{ type: "environment-shift", start: SHIFT_AT + SHIFT_STAGGER * k, noiseFactor: 2, label: "intake switched to the river main: noise floor ×2" }];
    if (k === DEGRADING) events.push({ type: "degradation", start: DEGRADATION_AT, defect: "outer-race", growth: "exponential", rate: 4, amplitude: 0.4, label: "drive-end bearing outer-race defect" });
    const sim = new MachineSimulator(defineScenario({ name: `harbour-lane-${pumpId(k)}`, length: LENGTH, seed: `harbour-lane/${pumpId(k)}`, schedule: [{ start: 0, mode: "mid", rpm: SPEEDS.mid }], events }));
    const rows: Float64Array[] = [];
    for (let s = sim.next(); s !== null; s = sim.next()) {
      const bands = new Float64Array(BANDS);
      const width = s.spectrum.length / BANDS;
      for (let b = 0; b < BANDS; b++) {
        let sum = 0;
        for (let j = 0; j < width; j++) sum += s.spectrum[b * width + j] as number;
        bands[b] = sum / width;
      }
      rows.push(bands);
    }
    out.push(rows);
  }
  return out;
}

/** What the demonstration produced. */
export interface SiteDemo {
  /** The whole input log, site-shift records included, in log order. */
  log: StreamEntry[];
  /** The output stream's entries (decisions and operator receipts), in commit order. */
  outputs: string[][];
  /** Dead letters (an operator event an engine refused). */
  dead: string[][];
  /** Pump → its decisions in order. */
  decisions: Map<string, Decision[]>;
  /** Pump → index of the last decision before each site-shift record reached it. */
  told: Map<string, number[]>;
}

const newOwner = (token: string, checkpointEvery: number): PartitionEngines =>
  new PartitionEngines(0, token, { offset: "0-0", consumed: 0, checkpoint: "0-0" }, () => new DecisionEngine(DEMO_ENGINE), { inputs: BANDS, allowNonFinite: false, checkpointEvery });

const nothingStored = (ids: readonly string[]): Map<string, StoredStream> => new Map(ids.map((id) => [id, { snapshot: null, quarantined: null }]));

/** Runs the demonstration: `withSiteEvidence` false leaves the site evidence out (the per-machine baseline). */
export function runSiteDemo(pumps: readonly Float64Array[][], withSiteEvidence = true): SiteDemo {
  const log: StreamEntry[] = [];
  const outputs: string[][] = [];
  const dead: string[][] = [];
  const decisions = new Map<string, Decision[]>();
  const told = new Map<string, number[]>();
  const onsets = new SiteOnsets(DEMO_SITE);
  const part = newOwner("demo", 4);
  let next = 1;
  const append = (fields: string[]): StreamEntry => {
    const entry: StreamEntry = [`${next++}-0`, fields];
    log.push(entry);
    return entry;
  };
  let pending: StreamEntry[] = [];
  for (let t0 = 0; t0 < LENGTH; t0 += ROUND) {
    for (let t = t0; t < Math.min(LENGTH, t0 + ROUND); t++) {
      for (let k = 0; k < PUMPS; k++) pending.push(append(sampleFields(pumpId(k), SITE, pumps[k]?.[t] as Float64Array, t)));
    }
    const plan: BatchPlan = part.decide(pending, nothingStored(part.missing(pending)));
    part.committed(plan);
    pending = [];
    outputs.push(...plan.outputs);
    dead.push(...plan.dead);
    for (const fields of plan.outputs) {
      const f = fieldsOf(fields);
      const stream = f.get("s") as string;
      if (f.has("op")) {
        const list = told.get(stream) ?? [];
        list.push((decisions.get(stream)?.length ?? 0) - 1);
        told.set(stream, list);
        continue;
      }
      const decision = JSON.parse(f.get("d") as string) as Decision;
      const list = decisions.get(stream) ?? [];
      list.push(decision);
      decisions.set(stream, list);
      if (!withSiteEvidence) continue;
      for (const target of onsets.observe(stream, SITE, Number(f.get("t")), isOnset(decision), decision.cause === "degradation")) pending.push(append(operatorFields(target, SITE, "site-shift")));
    }
  }
  return { log, outputs, dead, decisions, told };
}

/**
 * Replays the demonstration's input log through fresh owners: the first
 * commits `cut` batches of `batch` entries and dies, the next replays from
 * the last checkpoint and continues. Returns the output stream.
 */
export function replaySiteDemo(log: readonly StreamEntry[], batch: number, cut: number): string[][] {
  const outputs: string[][] = [];
  const checkpointEvery = 3;
  const snapshots = new Map<string, Buffer>();
  let position = { offset: "0-0", consumed: 0, checkpoint: "0-0" };
  const stored = (ids: readonly string[]): Map<string, StoredStream> => new Map(ids.map((id) => [id, { snapshot: snapshots.get(id) ?? null, quarantined: null }]));
  const positions = new Map(log.map(([id], i) => [id, i + 1]));
  const indexOf = (id: string): number => (id === "0-0" ? 0 : (positions.get(id) as number));
  for (const [token, limit] of [["first", cut], ["second", Infinity]] as const) {
    const part = new PartitionEngines(0, token, position, () => new DecisionEngine(DEMO_ENGINE), { inputs: BANDS, allowNonFinite: false, checkpointEvery });
    while (part.replaying) {
      const from = indexOf(part.cursor);
      const entries = log.slice(from, Math.min(indexOf(part.offset), from + batch));
      part.replay(entries, stored(part.missing(entries)));
    }
    for (let n = 0; n < limit; n++) {
      const from = indexOf(part.offset);
      const entries = log.slice(from, from + batch);
      if (entries.length === 0) break;
      const plan = part.decide(entries, stored(part.missing(entries)));
      for (const [id, bytes] of plan.snapshots) snapshots.set(id, bytes);
      outputs.push(...plan.outputs);
      part.committed(plan);
      position = { offset: part.offset, consumed: part.consumed, checkpoint: part.checkpoint };
    }
  }
  return outputs;
}

function fieldsOf(fields: readonly string[]): Map<string, string> {
  const f = new Map<string, string>();
  for (let i = 0; i + 1 < fields.length; i += 2) f.set(fields[i] as string, fields[i + 1] as string);
  return f;
}

/** The figures of a run: pages per pump kind, what the degrading pump was told and did. */
export interface SiteFigures {
  /** Anomaly alarms on the nineteen healthy pumps from the shift on. */
  anomalyPages: number;
  /** Healthy pumps that absorbed the shift (a retrain or a switch after it). */
  absorbed: number;
  /** Healthy pumps told of the site shift. */
  told: number;
  /** Healthy pumps told before their own first reaction to the shift (a held or alarmed sample). */
  toldAhead: number;
  /** Decisions on a healthy pump from the shift to its retrain, median. */
  medianDelay: number;
  /** The degrading pump: index of its first degradation alarm, or −1. */
  degradationAlarmAt: number;
  /** The degrading pump: site-shift records that reached it. */
  degradingTold: number;
  /** The degrading pump: index of its first decision with cause degradation (a warning or an alarm), or −1. */
  degradationEvidenceAt: number;
  /** The degrading pump: samples learnt or retrains from its first degradation evidence on. */
  degradingLearnt: number;
}

export function siteFigures(demo: SiteDemo): SiteFigures {
  let anomalyPages = 0;
  let absorbed = 0;
  let told = 0;
  let toldAhead = 0;
  const delays: number[] = [];
  for (let k = 0; k < PUMPS; k++) {
    if (k === DEGRADING) continue;
    const start = SHIFT_AT + SHIFT_STAGGER * k;
    const ds = (demo.decisions.get(pumpId(k)) ?? []).filter((d) => d.index >= start);
    anomalyPages += ds.filter((d) => d.action === "alarm" && d.cause === "anomaly").length;
    const absorbedAt = ds.find((d) => d.action === "retrain" || d.action === "switch-mode");
    if (absorbedAt !== undefined) {
      absorbed++;
      delays.push(absorbedAt.index - start);
    }
    const receipts = demo.told.get(pumpId(k)) ?? [];
    if (receipts.length > 0) told++;
    const reaction = ds.find((d) => d.action !== "learn");
    if (receipts.length > 0 && reaction !== undefined && (receipts[0] as number) < reaction.index) toldAhead++;
  }
  delays.sort((a, b) => a - b);
  const degrading = demo.decisions.get(pumpId(DEGRADING)) ?? [];
  const alarm = degrading.find((d) => d.action === "alarm" && d.cause === "degradation");
  const degradationAlarmAt = alarm?.index ?? -1;
  const degradationEvidenceAt = degrading.find((d) => d.index >= DEGRADATION_AT && d.cause === "degradation")?.index ?? -1;
  const after = degrading.filter((d) => d.index >= degradationEvidenceAt);
  return {
    anomalyPages,
    absorbed,
    told,
    toldAhead,
    medianDelay: delays.length === 0 ? -1 : (delays[Math.floor(delays.length / 2)] as number),
    degradationAlarmAt,
    degradationEvidenceAt,
    degradingTold: demo.told.get(pumpId(DEGRADING))?.length ?? 0,
    degradingLearnt: degradationEvidenceAt < 0 ? -1 : after.filter((d) => d.action === "learn" || d.action === "retrain").length,
  };
}
