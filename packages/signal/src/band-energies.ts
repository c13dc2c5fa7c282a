import { DimensionError, OptionError, finiteArray, optionsObject, positiveNumber, positiveInteger } from "@leeway/core";
import { frameArgument, refuseNonFiniteResult } from "./sample-checks.js";

/** Options of {@link BandEnergies}. */
export interface BandEnergiesOptions {
  /** Band edges in Hz, strictly increasing, from ≥ 0 to ≤ the Nyquist frequency; B + 1 edges make B bands. */
  edges: ArrayLike<number>;
  /** N, the frame length the power spectra come from. */
  size: number;
  /** f_s in Hz. */
  sampleRate: number;
}

/**
 * Energy (mean square, units²) in frequency bands of a one-sided power
 * spectrum of N/2 + 1 bins (as {@link SpectrumAnalyzer.power} returns):
 * E_b = Σ P_k over the bins whose centre frequency k·Δf lies in
 * [edge_b, edge_{b+1}) (the last band also takes a bin exactly at its upper
 * edge). The bin ranges are computed once.
 * Method: band power by summing ENBW-corrected bins (common practice, no source).
 * @example
 * const bands = new BandEnergies({ edges: [50, 150, 800, 1200], size: 1024, sampleRate: 5120 });
 * const sa = new SpectrumAnalyzer({ size: 1024, sampleRate: 5120 });
 * const x = new Float64Array(1024).map((_, t) => 2 * Math.sin((2 * Math.PI * 100 * t) / 5120));
 * bands.compute(sa.power(x)); // ≈ [2, 0, 0]: the 100 Hz sine's mean square A²/2 in the first band
 */
export class BandEnergies {
  /** The band edges in Hz. */
  readonly edges: Float64Array;
  readonly #from: Int32Array;
  readonly #to: Int32Array;
  readonly #bins: number;

  constructor(options: BandEnergiesOptions) {
    const o = optionsObject<BandEnergiesOptions>("BandEnergies", options, ["edges", "size", "sampleRate"]);
    const size = positiveInteger("BandEnergies", "size", o.size, 2 ** 24);
    if (size < 2 || size % 2 !== 0) throw new OptionError("BandEnergies", "size", o.size, "an even integer >= 2");
    const sampleRate = positiveNumber("BandEnergies", "sampleRate", o.sampleRate);
    const edges = finiteArray("BandEnergies", "edges", o.edges, { atLeast: 2 });
    const nyquist = sampleRate / 2;
    for (let i = 0; i < edges.length; i++) {
      const e = edges[i] as number;
      if (e < 0 || e > nyquist) throw new OptionError("BandEnergies", `edges[${i}]`, e, `a frequency in [0, ${nyquist}] Hz (0 to the Nyquist frequency)`);
      if (i > 0 && !(e > (edges[i - 1] as number))) {
        throw new OptionError("BandEnergies", `edges[${i}]`, e, `greater than edges[${i - 1}] = ${edges[i - 1]} (edges strictly increasing)`);
      }
    }
    this.edges = edges;
    this.#bins = size / 2 + 1;
    const df = sampleRate / size;
    const bands = edges.length - 1;
    this.#from = new Int32Array(bands);
    this.#to = new Int32Array(bands);
    for (let b = 0; b < bands; b++) {
      this.#from[b] = Math.ceil((edges[b] as number) / df - 1e-9);
      const upper = (edges[b + 1] as number) / df;
      this.#to[b] = b === bands - 1 ? Math.min(this.#bins, Math.floor(upper + 1e-9) + 1) : Math.ceil(upper - 1e-9);
    }
  }

  /** The number of bands. */
  get bands(): number {
    return this.#from.length;
  }

  /** Band energies of `power` (N/2 + 1 bins) into `out` (one value per band). */
  compute(power: Float64Array, out: Float64Array = new Float64Array(this.bands)): Float64Array {
    frameArgument("BandEnergies", "power", power, this.#bins);
    if (out.length !== this.bands) throw new DimensionError("BandEnergies", "out", this.bands, out.length);
    let total = 0;
    for (let b = 0; b < this.bands; b++) {
      let s = 0;
      for (let k = this.#from[b] as number, end = this.#to[b] as number; k < end; k++) s += power[k] as number;
      out[b] = s;
      total += s - s; // NaN once any band is NaN or ±Infinity
    }
    if (total !== 0) refuseNonFiniteResult("BandEnergies", "power", power, "band sums");
    return out;
  }
}
