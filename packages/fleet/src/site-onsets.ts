import { integerInRange, numberInRange, optionsObject, positiveNumber } from "@leeway/core";

/** Options of {@link SiteOnsets}. */
export interface SiteOnsetsOptions {
  /** Fraction of a site's known streams whose change onsets must meet within `window` for a site-wide shift, in (0, 1]. Default 0.5. */
  fraction?: number;
  /** Width of the window onsets must meet in, in the units of the streams' time (the records' `t`, else the sample index). Default 900. */
  window?: number;
  /** Fewest onsets that make a site-wide shift, whatever the fraction, 2 or more. Default 3. */
  minStreams?: number;
}

interface SiteState {
  streams: Set<string>;
  /** Streams whose latest decision had cause "degradation". */
  degrading: Set<string>;
  /** Stream → time of its latest change onset. */
  onsets: Map<string, number>;
  /** Time the site-wide shift now standing was recognised, or null. */
  episode: number | null;
  /** Streams told during the standing episode. */
  told: Set<string>;
}

/**
 * Where the change onsets of all streams of a site meet. When at least
 * `fraction` of a site's streams (and at least `minStreams`) have a change
 * onset within `window`, the shift is the site's (an environment change:
 * concept drift) and every stream of the site is to be told once: those
 * that shifted (their engines absorb the change under way) and the others,
 * ahead of their own onset (their engines take their next change within
 * their window as the site's, instead of paging). A stream whose latest
 * decision was a degradation is not told: a degrading machine stays a
 * fault. A stream first seen after that moment is told at its onset within
 * `window`. An onset confined to one machine tells nobody: it stays a fault
 * candidate.
 * @example
 * const sites = new SiteOnsets({ fraction: 0.5, window: 100, minStreams: 2 });
 * for (const s of ["p1", "p2", "p3", "p4"]) sites.observe(s, "harbour-lane", 0, false);
 * sites.observe("p4", "harbour-lane", 10, false, true); // [] (p4 is degrading)
 * sites.observe("p1", "harbour-lane", 500, true); // []
 * sites.observe("p2", "harbour-lane", 530, true); // ["p1", "p2", "p3"]
 * sites.observe("p3", "harbour-lane", 560, true); // [] (told already)
 */
export class SiteOnsets {
  readonly fraction: number;
  readonly window: number;
  readonly minStreams: number;
  readonly #sites = new Map<string, SiteState>();

  constructor(options: SiteOnsetsOptions = {}) {
    const o = optionsObject<SiteOnsetsOptions>("SiteOnsets", options, ["fraction", "window", "minStreams"]);
    this.fraction = numberInRange("SiteOnsets", "fraction", o.fraction ?? 0.5, { min: 0, max: 1, minExclusive: true });
    this.window = positiveNumber("SiteOnsets", "window", o.window ?? 900);
    this.minStreams = integerInRange("SiteOnsets", "minStreams", o.minStreams ?? 3, 2, 1 << 30);
  }

  /** Streams known at `site` so far. */
  streamsOf(site: string): number {
    return this.#sites.get(site)?.streams.size ?? 0;
  }

  /**
   * One decision of `stream` at `site` at `time`; `onset` when it is a change
   * onset, `degrading` when its cause is degradation. Returns the streams to
   * tell of a site-wide shift now (often none).
   */
  observe(stream: string, site: string, time: number, onset: boolean, degrading = false): string[] {
    let s = this.#sites.get(site);
    if (s === undefined) {
      s = { streams: new Set(), degrading: new Set(), onsets: new Map(), episode: null, told: new Set() };
      this.#sites.set(site, s);
    }
    s.streams.add(stream);
    if (degrading) s.degrading.add(stream);
    else s.degrading.delete(stream);
    if (!onset) return [];
    s.onsets.set(stream, time);
    for (const [other, at] of s.onsets) if (at < time - this.window) s.onsets.delete(other);
    if (s.episode !== null && time - s.episode > this.window) {
      s.episode = null;
      s.told.clear();
    }
    if (s.episode !== null) return this.#tell(s, [stream]);
    if (s.onsets.size < this.minStreams || s.onsets.size < this.fraction * s.streams.size) return [];
    s.episode = time;
    return this.#tell(s, [...s.onsets.keys(), ...s.streams]);
  }

  #tell(s: SiteState, streams: string[]): string[] {
    const out: string[] = [];
    for (const stream of streams) {
      if (s.told.has(stream) || s.degrading.has(stream)) continue;
      s.told.add(stream);
      out.push(stream);
    }
    return out;
  }
}
