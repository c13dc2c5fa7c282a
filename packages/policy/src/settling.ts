import { envelope, openSnapshot, type Snapshot } from "@leeway/core";
import { SettlingWindow } from "./settling-window.js";

/** The plain state of a {@link Settling}. */
export interface SettlingState {
  window: Snapshot;
  start: number;
  risingRun: number;
  afterAnomaly: boolean;
}

/**
 * A settling span: after a change (or an acknowledged anomaly) nothing is
 * learnt while the post-change samples fill the {@link SettlingWindow}; the
 * span remembers where it began, how many window checks in a row found a
 * rising ramp, and whether it follows an anomaly alarm (then a level that
 * persists needs the operator).
 * @example
 * const s = new Settling(40);
 * s.begin(100);
 * [s.start, s.afterAnomaly]; // [100, false]
 */
export class Settling {
  static readonly kind = "leeway.policy.settling";
  static readonly version = 1;
  #window: SettlingWindow;
  #start = -1;
  #risingRun = 0;
  #afterAnomaly = false;

  constructor(width: number) {
    this.#window = new SettlingWindow(width);
  }

  /** The window of post-change samples (its ring positions match the rows feature mode keeps). */
  get window(): SettlingWindow {
    return this.#window;
  }
  /** Index at which the span began, or −1. */
  get start(): number {
    return this.#start;
  }
  /** Consecutive window checks with a rising trend. */
  get risingRun(): number {
    return this.#risingRun;
  }
  /** True when the span follows an acknowledged anomaly alarm. */
  get afterAnomaly(): boolean {
    return this.#afterAnomaly;
  }

  /** A span begins (again) at `index` with an empty window. */
  begin(index: number, afterAnomaly = this.#afterAnomaly): void {
    this.#window.clear();
    this.#start = index;
    this.#risingRun = 0;
    this.#afterAnomaly = afterAnomaly;
  }

  /** The span ends (watching again, an alarm, a retrain). */
  end(): void {
    this.#window.clear();
    this.#start = -1;
    this.#afterAnomaly = false;
  }

  /** Counts a window check: rising (a ramp) or not; returns the run. */
  countRising(rising: boolean): number {
    this.#risingRun = rising ? this.#risingRun + 1 : 0;
    return this.#risingRun;
  }

  snapshot(): Snapshot<SettlingState> {
    return envelope(Settling.kind, Settling.version, { window: this.#window.snapshot(), start: this.#start, risingRun: this.#risingRun, afterAnomaly: this.#afterAnomaly });
  }

  static restore(snapshot: unknown, width: number): Settling {
    const r = openSnapshot(snapshot, Settling.kind, Settling.version);
    const window = SettlingWindow.restore(r.raw("window"), width);
    const big = Number.MAX_SAFE_INTEGER;
    const start = r.integer("start", -1, big);
    const risingRun = r.integer("risingRun", 0, big);
    const afterAnomaly = r.boolean("afterAnomaly");
    const s = new Settling(width);
    s.#window = window;
    s.#start = start;
    s.#risingRun = risingRun;
    s.#afterAnomaly = afterAnomaly;
    return s;
  }
}
