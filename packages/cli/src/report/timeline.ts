import { integerInRange, optionsObject } from "@leeway/core";
import { ACTIONS, CAUSES, PHASES, type Action, type Cause, type Decision, type Phase } from "@leeway/policy";

/** One min/max trace of a numeric evidence field, one entry per bucket (±Infinity where the field was absent). */
export interface BucketSeries {
  /** Evidence path, e.g. `"liveScore"`, `"referenceScores.0"`, `"drift.statistic"`. */
  key: string;
  min: Float64Array;
  max: Float64Array;
}

/** A decision where the (action, cause, phase) triple changed, kept for the report's table. */
export interface DecisionTransition {
  index: number;
  time: string | number | null;
  action: Action;
  cause: Cause;
  phase: Phase;
  liveScore: number;
  /** `evidence.mode` when the decision carries one (the demo's engines per speed add it), else null. */
  mode: string | null;
  /** Short text of the decision's evidence (string fields and names of the tests that took part). */
  detail: string;
  /** The decision's whole evidence. */
  evidence: Record<string, unknown>;
}

/** Options of {@link TimelineCollector}. */
export interface TimelineCollectorOptions {
  /** Most buckets kept (≈ pixel columns of a plot); 64 to 8192, default 1200 (an odd number is rounded down to even). */
  columns?: number;
  /** Most decision transitions kept for the table (default 400); later ones are counted. */
  transitions?: number;
  /** Most distinct evidence fields traced (default 48). */
  series?: number;
  /**
   * Place samples by their decision index counted from this index (lanes of
   * one engine among several share the stream's axis this way); default:
   * in the order they are added, from the first.
   */
  origin?: number;
}

const MAX_DEPTH_KEYS = 64;

/**
 * Gathers a decision stream for drawing in constant memory. Samples fall into
 * buckets of `width` consecutive samples; each bucket keeps, per numeric
 * evidence field, its minimum and maximum, and bit masks of the phases,
 * causes and actions seen. When the buckets run out, neighbours merge in pairs
 * and `width` doubles, so a stream of any length ends in between columns/2
 * and columns buckets whose min/max envelope is exact (min/max decimation,
 * the way oscilloscopes draw long records).
 * @example
 * const t = new TimelineCollector({ columns: 1000 });
 * for (const d of decisions) t.add(d);
 * t.bucketCount; // ≤ 1000, whatever decisions.length is
 */
export class TimelineCollector {
  readonly #columns: number;
  readonly #maxTransitions: number;
  readonly #maxSeries: number;
  #count = 0;
  #width = 1; // samples per bucket
  #buckets = 0;
  readonly #series = new Map<string, BucketSeries>();
  readonly #nested = new Map<string, Map<string, BucketSeries | null>>();
  readonly #phaseMask: Uint8Array;
  readonly #causeMask: Uint8Array;
  readonly #actionMask: Uint8Array;
  readonly #firstIndex: Float64Array;
  readonly #time: (string | number | null)[];
  readonly #transitions: DecisionTransition[] = [];
  #transitionsOmitted = 0;
  #last: { action: Action; cause: Cause; phase: Phase } | null = null;
  readonly #counts = new Map<string, number>();
  #firstDecisionIndex = 0;
  #lastDecisionIndex = -1;
  readonly #origin: number | null;
  #lastTime: string | number | null = null;
  #lastDecision: Decision | null = null;
  #openedBy: { decision: Decision; time: string | number | null } | null = null;
  #lastLimit: { decision: Decision; time: string | number | null } | null = null;

  constructor(options: TimelineCollectorOptions = {}) {
    const o = optionsObject<TimelineCollectorOptions>("TimelineCollector", options, ["columns", "transitions", "series", "origin"]);
    const columns = o.columns === undefined ? 1200 : integerInRange("TimelineCollector", "columns", o.columns, 64, 8192);
    this.#columns = columns - (columns % 2);
    this.#maxTransitions = o.transitions === undefined ? 400 : integerInRange("TimelineCollector", "transitions", o.transitions, 0, 1_000_000);
    this.#maxSeries = o.series === undefined ? 48 : integerInRange("TimelineCollector", "series", o.series, 1, 1024);
    this.#origin = o.origin === undefined ? null : integerInRange("TimelineCollector", "origin", o.origin, 0, Number.MAX_SAFE_INTEGER);
    this.#phaseMask = new Uint8Array(this.#columns);
    this.#causeMask = new Uint8Array(this.#columns);
    this.#actionMask = new Uint8Array(this.#columns);
    this.#firstIndex = new Float64Array(this.#columns);
    this.#time = new Array<string | number | null>(this.#columns).fill(null);
  }

  /** Adds the next decision (and the time of its sample, if the stream has one). */
  add(decision: Decision, time: string | number | null = null): void {
    const position = this.#origin === null ? this.#count : Math.max(0, decision.index - this.#origin);
    let b = Math.floor(position / this.#width);
    while (b >= this.#columns) {
      this.#mergePairs();
      b = Math.floor(position / this.#width);
    }
    if (b >= this.#buckets) {
      this.#buckets = b + 1;
      this.#firstIndex[b] = decision.index;
      this.#time[b] = time;
    }
    if (this.#count === 0) this.#firstDecisionIndex = decision.index;
    this.#lastDecisionIndex = decision.index;
    this.#lastTime = time;
    this.#count++;
    this.#phaseMask[b] = (this.#phaseMask[b] as number) | (1 << PHASES.indexOf(decision.phase));
    this.#causeMask[b] = (this.#causeMask[b] as number) | (1 << CAUSES.indexOf(decision.cause));
    this.#actionMask[b] = (this.#actionMask[b] as number) | (1 << ACTIONS.indexOf(decision.action));
    const countKey = `${decision.action}\u0000${decision.cause}`;
    this.#counts.set(countKey, (this.#counts.get(countKey) ?? 0) + 1);
    this.#trace(decision.evidence as unknown as Record<string, unknown>, b);
    const last = this.#last;
    // What opened the state that needs attention: a latched alarm, a retrain waiting for confirmation, or
    // an acknowledged event the engine still holds (evidence sameEvent; it stays opened by its alarm).
    const acknowledged = decision.evidence.sameEvent !== undefined;
    const open = decision.phase === "latched" || decision.action === "await-confirmation" || acknowledged;
    if (!open) this.#openedBy = null;
    else if (this.#openedBy === null || (last !== null && last.phase !== decision.phase && !acknowledged)) this.#openedBy = { decision, time };
    this.#lastDecision = decision;
    if (typeof decision.evidence.limit === "object" && decision.evidence.limit !== null) this.#lastLimit = { decision, time };
    if (last === null || last.action !== decision.action || last.cause !== decision.cause || last.phase !== decision.phase) {
      this.#last = { action: decision.action, cause: decision.cause, phase: decision.phase };
      if (this.#transitions.length < this.#maxTransitions) {
        this.#transitions.push({
          index: decision.index,
          time,
          action: decision.action,
          cause: decision.cause,
          phase: decision.phase,
          liveScore: decision.evidence.liveScore,
          mode: typeof decision.evidence.mode === "string" ? decision.evidence.mode : null,
          detail: evidenceDetail(decision.evidence as unknown as Record<string, unknown>),
          evidence: decision.evidence as unknown as Record<string, unknown>,
        });
      } else this.#transitionsOmitted++;
    }
  }

  #trace(evidence: Record<string, unknown>, b: number): void {
    for (const key in evidence) {
      const v = evidence[key];
      if (typeof v === "number") {
        if (Number.isFinite(v)) this.#put(this.#seriesFor(key), b, v);
      } else if (typeof v === "object" && v !== null) {
        let inner = this.#nested.get(key);
        if (inner === undefined) {
          inner = new Map();
          this.#nested.set(key, inner);
        }
        const entries = v as Record<string, unknown>;
        let seen = 0;
        for (const sub in entries) {
          if (++seen > MAX_DEPTH_KEYS) break;
          const w = entries[sub];
          if (typeof w !== "number" || !Number.isFinite(w)) continue;
          let series = inner.get(sub);
          if (series === undefined) {
            series = this.#series.size < this.#maxSeries ? this.#seriesFor(`${key}.${sub}`) : null;
            inner.set(sub, series);
          }
          if (series !== null) this.#put(series, b, w);
        }
      }
    }
  }

  #seriesFor(key: string): BucketSeries {
    let series = this.#series.get(key);
    if (series === undefined) {
      series = { key, min: new Float64Array(this.#columns).fill(Infinity), max: new Float64Array(this.#columns).fill(-Infinity) };
      if (this.#series.size < this.#maxSeries) this.#series.set(key, series);
    }
    return series;
  }

  #put(series: BucketSeries, b: number, v: number): void {
    if (v < (series.min[b] as number)) series.min[b] = v;
    if (v > (series.max[b] as number)) series.max[b] = v;
  }

  #mergePairs(): void {
    if (this.#buckets > this.#columns) this.#buckets = this.#columns;
    const half = this.#columns / 2;
    for (const s of this.#series.values()) {
      for (let j = 0; j < half; j++) {
        s.min[j] = Math.min(s.min[2 * j] as number, s.min[2 * j + 1] as number);
        s.max[j] = Math.max(s.max[2 * j] as number, s.max[2 * j + 1] as number);
      }
      s.min.fill(Infinity, half);
      s.max.fill(-Infinity, half);
    }
    for (const mask of [this.#phaseMask, this.#causeMask, this.#actionMask]) {
      for (let j = 0; j < half; j++) mask[j] = (mask[2 * j] as number) | (mask[2 * j + 1] as number);
      mask.fill(0, half);
    }
    for (let j = 0; j < half; j++) {
      this.#firstIndex[j] = this.#firstIndex[2 * j] as number;
      this.#time[j] = this.#time[2 * j] ?? null;
    }
    this.#time.fill(null, half);
    this.#width *= 2;
    this.#buckets = Math.ceil(this.#buckets / 2);
  }

  /** Decisions added. */
  get count(): number {
    return this.#count;
  }
  /** Samples per bucket. */
  get bucketWidth(): number {
    return this.#width;
  }
  /** Buckets in use (≤ columns). */
  get bucketCount(): number {
    return this.#buckets;
  }

  /** What was gathered, for drawing; arrays are cut to the buckets in use. */
  result(): ReportTimeline {
    const n = this.#buckets;
    const counts: { action: Action; cause: Cause; count: number }[] = [];
    for (const [key, count] of this.#counts) {
      const [action, cause] = key.split("\u0000") as [Action, Cause];
      counts.push({ action, cause, count });
    }
    counts.sort((a, b) => ACTIONS.indexOf(a.action) - ACTIONS.indexOf(b.action) || CAUSES.indexOf(a.cause) - CAUSES.indexOf(b.cause));
    return {
      count: this.#count,
      origin: this.#origin ?? this.#firstDecisionIndex,
      lastTime: this.#lastTime,
      last: this.#lastDecision,
      openedBy: this.#openedBy,
      lastLimit: this.#lastLimit,
      firstIndex: this.#firstDecisionIndex,
      lastIndex: this.#lastDecisionIndex,
      bucketWidth: this.#width,
      buckets: n,
      series: [...this.#series.values()].map((s) => ({ key: s.key, min: s.min.slice(0, n), max: s.max.slice(0, n) })),
      phaseMask: this.#phaseMask.slice(0, n),
      causeMask: this.#causeMask.slice(0, n),
      actionMask: this.#actionMask.slice(0, n),
      bucketIndex: this.#firstIndex.slice(0, n),
      bucketTime: this.#time.slice(0, n),
      transitions: this.#transitions.slice(),
      transitionsOmitted: this.#transitionsOmitted,
      counts,
    };
  }
}

/** A decimated decision stream, ready to draw (see {@link TimelineCollector}). */
export interface ReportTimeline {
  count: number;
  /** Decision index of bucket 0's first position. */
  origin: number;
  /** Time of the last decision's sample. */
  lastTime: string | number | null;
  /** The last decision added, or null. */
  last: Decision | null;
  /** The decision (and its time) that opened the state the last decision is in, when that state needs attention (a latched alarm, a retrain awaiting confirmation); else null. */
  openedBy: { decision: Decision; time: string | number | null } | null;
  /** The latest decision (and its time) whose evidence tells the time to the engine's limit (`evidence.limit`), or null. */
  lastLimit: { decision: Decision; time: string | number | null } | null;
  /** `index` of the first and last decision. */
  firstIndex: number;
  lastIndex: number;
  bucketWidth: number;
  buckets: number;
  series: BucketSeries[];
  /** Per bucket, bit p set when phase PHASES[p] occurred; likewise for causes and actions. */
  phaseMask: Uint8Array;
  causeMask: Uint8Array;
  actionMask: Uint8Array;
  /** Decision index of each bucket's first sample. */
  bucketIndex: Float64Array;
  /** Time of each bucket's first sample, when the stream has a time column. */
  bucketTime: (string | number | null)[];
  transitions: DecisionTransition[];
  transitionsOmitted: number;
  /** Decisions per (action, cause). */
  counts: { action: Action; cause: Cause; count: number }[];
}

/** A short text of the non-numeric evidence ("test: cusum; reason: …"), for tables. */
export function evidenceDetail(evidence: Record<string, unknown>): string {
  const parts: string[] = [];
  for (const [key, value] of Object.entries(evidence)) {
    if (key === "liveScore" || key === "referenceScores" || key === "mode") continue;
    if (typeof value === "string" || typeof value === "boolean") parts.push(`${key}: ${String(value)}`);
    else if (typeof value === "object" && value !== null && !Array.isArray(value)) {
      const inner = Object.entries(value as Record<string, unknown>)
        .filter(([, v]) => typeof v === "string" || typeof v === "boolean")
        .map(([k, v]) => `${k} ${String(v)}`);
      parts.push(inner.length > 0 ? `${key} (${inner.join(", ")})` : key);
    }
  }
  const text = parts.join("; ");
  return text.length > 160 ? `${text.slice(0, 157)}...` : text;
}
