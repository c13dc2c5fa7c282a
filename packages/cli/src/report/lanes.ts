import type { Decision } from "@leeway/policy";
import { TimelineCollector, type ReportTimeline, type TimelineCollectorOptions } from "./timeline.js";

/** Most engines (operating modes) drawn in lanes of their own; decisions of further modes share the last lane. */
export const MAX_LANES = 8;

/** One engine's lane: its name (the operating mode, or "" for a single engine) and its timeline on the shared axis. */
export interface Lane {
  name: string;
  timeline: ReportTimeline;
}

/** What a report draws: the whole record, and one lane per engine. */
export interface ReportData {
  /** Every decision, in stream order (phases, causes, counts, the decision changes). */
  all: ReportTimeline;
  /** One lane per engine, each with its own scores, thresholds and tests. */
  lanes: Lane[];
}

/**
 * Gathers a decision stream for a report in constant memory: the whole
 * stream in one {@link TimelineCollector}, and the decisions of each engine
 * (named by `evidence.mode`, as the mode router writes it) in a collector of
 * their own placed on the same axis, so that each engine's scores and
 * thresholds are drawn in a lane of their own instead of one interleaved trace.
 * @example
 * const c = new ReportCollector();
 * for (const d of decisions) c.add(d);
 * c.result().lanes.map((l) => l.name); // ["low", "mid", "high"] for the demo
 */
export class ReportCollector {
  readonly #options: TimelineCollectorOptions;
  readonly #all: TimelineCollector;
  readonly #lanes = new Map<string, TimelineCollector>();
  #origin: number | null = null;
  #shared = false;

  constructor(options: Omit<TimelineCollectorOptions, "origin"> = {}) {
    this.#options = options;
    this.#all = new TimelineCollector(options);
  }

  /** Adds the next decision (and the time of its sample, if the stream has one). */
  add(decision: Decision, time: string | number | null = null): void {
    if (this.#origin === null) this.#origin = decision.index;
    this.#all.add(decision, time);
    const mode = decision.evidence.mode;
    if (typeof mode !== "string") return;
    let lane = this.#lanes.get(mode);
    if (lane === undefined) {
      if (this.#lanes.size >= MAX_LANES) {
        lane = [...this.#lanes.values()][MAX_LANES - 1] as TimelineCollector;
        this.#shared = true;
      }
      else {
        lane = new TimelineCollector({ ...this.#options, origin: this.#origin });
        this.#lanes.set(mode, lane);
      }
    }
    lane.add(decision, time);
  }

  /** Decisions added. */
  get count(): number {
    return this.#all.count;
  }

  /** What was gathered: the whole record and its lanes (one unnamed lane when the decisions name no mode). */
  result(): ReportData {
    const all = this.#all.result();
    const names = [...this.#lanes.keys()];
    const lanes = names.length === 0 ? [{ name: "", timeline: all }] : names.map((name, k) => ({ name: k === MAX_LANES - 1 && this.#shared ? `${name} and others` : name, timeline: (this.#lanes.get(name) as TimelineCollector).result() }));
    return { all, lanes };
  }
}
