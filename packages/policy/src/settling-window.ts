import { envelope, openSnapshot, toPlainArray, type Snapshot } from "@leeway/core";
import { WindowTrend } from "@leeway/stats";

/** What the settling window says about the post-change stream. */
export interface SettlingCheck {
  /** Samples kept since settling began (anomalies are not kept). */
  samples: number;
  /** Samples the window needs before it can be called stationary. */
  needed: number;
  /** Mann-Kendall z of the active reference's normalised score over the window (two-sided use). */
  trendZ: number;
  /** Newer half mean minus older half mean of that score, in σ. */
  shift: number;
  /** Window means of the normalised scores under the active, the commissioning and the newest reference, in σ. */
  activeLevel: number;
  commissioningLevel: number;
  newestLevel: number;
  /** Spread (sample standard deviation) of the active score over the window, in σ. */
  activeSpread: number;
}

/** The plain state of a {@link SettlingWindow}. */
export interface SettlingWindowState {
  width: number;
  count: number;
  head: number;
  active: number[];
  commissioning: number[];
  newest: number[];
  trend: Snapshot;
}

/**
 * The window a change settles in: the last `width` normalised scores of the
 * active, commissioning and newest references after a change, a sliding
 * Mann-Kendall test over the active one ("no significant trend") and the
 * difference of its half means ("no further change").
 *
 * @example
 * const w = new SettlingWindow(40);
 * for (let i = 0; i < 40; i++) w.push(2 + (i % 2) * 0.1, 2, 2);
 * Math.round(w.check().activeLevel * 100) / 100; // 2.05
 */
export class SettlingWindow {
  static readonly kind = "leeway.policy.settling-window";
  static readonly version = 1;
  readonly #width: number;
  #count = 0;
  #head = 0; // next ring position written
  readonly #active: Float64Array;
  readonly #commissioning: Float64Array;
  readonly #newest: Float64Array;
  #trend: WindowTrend;

  constructor(width: number) {
    this.#width = width;
    this.#active = new Float64Array(width);
    this.#commissioning = new Float64Array(width);
    this.#newest = new Float64Array(width);
    this.#trend = new WindowTrend({ width });
  }

  /** Samples kept since the window was cleared. */
  get count(): number {
    return this.#count;
  }

  /** The ring position the next {@link push} writes (the engine keeps its rows at the same position). */
  get head(): number {
    return this.#head;
  }

  get width(): number {
    return this.#width;
  }

  /** True once the window holds `width` samples. */
  get full(): boolean {
    return this.#count >= this.#width;
  }

  /** Keeps one sample's normalised scores; returns the ring position it took. */
  push(active: number, commissioning: number, newest: number): number {
    const at = this.#head;
    this.#active[at] = active;
    this.#commissioning[at] = commissioning;
    this.#newest[at] = newest;
    this.#head = at + 1 === this.#width ? 0 : at + 1;
    this.#count += 1;
    this.#trend.observe(active);
    return at;
  }

  /** Ring positions of the kept samples, oldest first. */
  positions(): number[] {
    const n = Math.min(this.#count, this.#width);
    const out: number[] = new Array(n);
    const start = this.#count >= this.#width ? this.#head : 0;
    for (let i = 0; i < n; i++) out[i] = (start + i) % this.#width;
    return out;
  }

  /** Normalised active score at a ring position. */
  activeAt(position: number): number {
    return this.#active[position] as number;
  }

  /** Levels, spread, trend and half shift of the window as it is now. */
  check(): SettlingCheck {
    const n = Math.min(this.#count, this.#width);
    const start = this.#count >= this.#width ? this.#head : 0;
    const half = n >> 1;
    let sumOld = 0;
    let sumNew = 0;
    let sumC = 0;
    let sumN = 0;
    for (let i = 0; i < n; i++) {
      const p = (start + i) % this.#width;
      const a = this.#active[p] as number;
      if (i < half) sumOld += a;
      else sumNew += a;
      sumC += this.#commissioning[p] as number;
      sumN += this.#newest[p] as number;
    }
    const level = n > 0 ? (sumOld + sumNew) / n : Number.NaN;
    let ss = 0;
    for (let i = 0; i < n; i++) {
      const d = (this.#active[(start + i) % this.#width] as number) - level;
      ss += d * d;
    }
    const z = this.#trend.z;
    return {
      samples: this.#count,
      needed: this.#width,
      trendZ: Number.isFinite(z) ? z : 0,
      shift: half > 0 && n - half > 0 ? sumNew / (n - half) - sumOld / half : 0,
      activeLevel: level,
      commissioningLevel: n > 0 ? sumC / n : Number.NaN,
      newestLevel: n > 0 ? sumN / n : Number.NaN,
      activeSpread: n > 1 ? Math.sqrt(ss / (n - 1)) : 0,
    };
  }

  /** Empties the window (a new settling begins). */
  clear(): void {
    this.#count = 0;
    this.#head = 0;
    this.#active.fill(0);
    this.#commissioning.fill(0);
    this.#newest.fill(0);
    this.#trend = new WindowTrend({ width: this.#width });
  }

  snapshot(): Snapshot<SettlingWindowState> {
    return envelope(SettlingWindow.kind, SettlingWindow.version, {
      width: this.#width,
      count: this.#count,
      head: this.#head,
      active: toPlainArray(this.#active),
      commissioning: toPlainArray(this.#commissioning),
      newest: toPlainArray(this.#newest),
      trend: this.#trend.snapshot() as Snapshot,
    });
  }

  /** Rebuilds a settling window whose width must equal `width`. */
  static restore(snapshot: unknown, width: number): SettlingWindow {
    const r = openSnapshot(snapshot, SettlingWindow.kind, SettlingWindow.version);
    r.integer("width", width, width);
    const count = r.integer("count", 0, Number.MAX_SAFE_INTEGER);
    const head = r.integer("head", 0, width - 1);
    if (count < width && head !== count) r.fail("head", `must equal count (${count}) while the window is not full, got ${head}`);
    const active = r.numbers("active", width);
    const commissioning = r.numbers("commissioning", width);
    const newest = r.numbers("newest", width);
    const trend = WindowTrend.restore(r.raw("trend"));
    if (trend.size !== Math.min(count, width)) r.fail("trend", `must hold ${Math.min(count, width)} points, got ${trend.size}`);
    const w = new SettlingWindow(width);
    w.#count = count;
    w.#head = head;
    w.#active.set(active);
    w.#commissioning.set(commissioning);
    w.#newest.set(newest);
    w.#trend = trend;
    return w;
  }
}
