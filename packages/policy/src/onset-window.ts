import { toPlainArray, type SnapshotReader } from "@leeway/core";
import { changeOnset } from "./change-onset.js";

/** Normalised scores the change rule keeps for placing a change's onset (about 4 min at 1 Hz, 43 min at one sample per 10 s). */
export const ONSET_WINDOW = 256;

/** Where a confirmed change most probably began, for the start of settling. */
export interface OnsetEvidence {
  /** The sample index settling starts at: the posterior's most probable onset, or the alarm's own index when the window shows no change. */
  at: number;
  /** The shortest span of onsets holding 90 % of the posterior mass, as sample indices. */
  earliest: number;
  latest: number;
  /** Posterior probability of the most probable run length. */
  probability: number;
}

/**
 * The last {@link ONSET_WINDOW} normalised scores the change test saw, so that
 * when it fires the onset can be placed where the level moved rather than
 * where the test crossed its threshold: {@link changeOnset} (Bayesian online
 * change-point detection, Adams & MacKay 2007, prior N(0, 1) in σ) over the
 * window, once per change.
 * @example
 * const w = new OnsetWindow();
 * for (let i = 0; i < 200; i++) w.push((i < 150 ? 0 : 3) + 0.3 * Math.sin(i * 1.7));
 * w.onset(1199).at; // 1150: the alarm at sample 1199 (the 200th pushed), the level moved 50 samples before
 */
export class OnsetWindow {
  readonly #ring = new Float64Array(ONSET_WINDOW);
  #count = 0; // samples pushed since the last clear (the ring holds the newest min(count, ONSET_WINDOW))

  /** Samples held. */
  get size(): number {
    return Math.min(this.#count, ONSET_WINDOW);
  }

  push(z: number): void {
    this.#ring[this.#count % ONSET_WINDOW] = z;
    this.#count += 1;
  }

  clear(): void {
    this.#count = 0;
  }

  /** The held scores, oldest first (a fresh array). */
  values(): Float64Array {
    const n = this.size;
    const out = new Float64Array(n);
    for (let i = 0; i < n; i++) out[i] = this.#ring[(this.#count - n + i) % ONSET_WINDOW] as number;
    return out;
  }

  /** The onset of the latest change when the newest held score is sample `index`. */
  onset(index: number): OnsetEvidence {
    const n = this.size;
    if (n < 2) return { at: index, earliest: index, latest: index, probability: 1 };
    const o = changeOnset(this.values(), { firstIndex: Math.max(0, index - n + 1) });
    return { at: o.onset ?? index, earliest: o.earliest, latest: o.latest, probability: o.probability };
  }

  /** The held scores as plain data (oldest first). */
  plain(): number[] {
    return toPlainArray(this.values());
  }

  /** Reads what {@link OnsetWindow.plain} wrote, under field `name`: at most {@link ONSET_WINDOW} scores within ±`clip` (the normalised scores' clip). */
  static read(r: SnapshotReader, name: string, clip: number): OnsetWindow {
    const values = r.numbers(name, { max: ONSET_WINDOW });
    for (const z of values) if (!(Math.abs(z) <= clip)) r.fail(name, `must hold normalised scores within ±${clip} σ (scoreClip), got ${z}`);
    const w = new OnsetWindow();
    for (const z of values) w.push(z);
    return w;
  }
}
