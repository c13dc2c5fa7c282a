import { DimensionError, OptionError, SampleError } from "@leeway/core";

/** The largest transform size accepted (2^24 points). */
export const MAX_FFT_SIZE = 2 ** 24;

/**
 * An in-place discrete Fourier transform of real frames whose length N is a
 * power of two, X_k = Σ_n x_n·e^{−2πikn/N}.
 *
 * Method: the N real samples are read as N/2 complex samples
 * z_n = x_{2n} + i·x_{2n+1}; one complex FFT of length M = N/2 (iterative
 * decimation in time on bit-reversed input, radix-4 butterflies with one
 * radix-2 stage when log2 M is odd; Cooley & Tukey, 1965) is followed by the
 * split step that separates the even and odd halves (Brigham, 1988;
 * Sorensen et al., 1987):
 *   E_k = (Z_k + conj Z_{M−k}) / 2,  O_k = (Z_k − conj Z_{M−k}) / (2i),
 *   X_k = E_k + W^k·O_k,  X_{M−k} = conj(E_k − W^k·O_k),  W = e^{−2πi/N}.
 * Every twiddle factor and the bit-reversal permutation are computed once in
 * the constructor; a transform allocates nothing.
 *
 * Packed layout of the result (the frame's own array, overwritten):
 * `data[0]` = X_0 (real), `data[1]` = X_{N/2} (real, Nyquist),
 * `data[2k]`, `data[2k+1]` = Re X_k, Im X_k for 0 < k < N/2.
 *
 * @example
 * const fft = new RealFft(8);
 * const x = Float64Array.from([1, 1, 1, 1, 1, 1, 1, 1]);
 * fft.forward(x); // x[0] === 8 (DC), every other entry 0
 * fft.inverse(x); // x is all ones again
 */
export class RealFft {
  /** N, the number of real samples per frame. */
  readonly size: number;
  readonly #half: number; // M = N/2 complex points
  readonly #reversed: Int32Array; // interleaved offset 2·rev(i) of the input read as point i
  readonly #firstRadix: number; // 1, 2, 4 or 8: the twiddle-free first stage (fused with the bit reversal)
  readonly #scratch: Float64Array; // the complex FFT runs out of place, data → scratch
  readonly #stages: Float64Array[]; // per radix-4 stage: [w1r, w1i, w2r, w2i, w3r, w3i] for each j < h
  readonly #stageHalf: Int32Array; // h of each radix-4 stage (block of 4h)
  readonly #splitCos: Float64Array; // cos(2πk/N), k ≤ M/2
  readonly #splitSin: Float64Array; // sin(2πk/N), k ≤ M/2

  /** @param size N, a power of two in [2, 2^24]. */
  constructor(size: number) {
    if (!isPowerOfTwo(size) || size < 2 || size > MAX_FFT_SIZE) {
      throw new OptionError("RealFft", "size", size, `a power of two in [2, ${MAX_FFT_SIZE}]`);
    }
    this.size = size;
    const m = size / 2;
    this.#half = m;
    this.#reversed = bitReversedOffsets(m);
    this.#scratch = new Float64Array(size);
    const log = Math.round(Math.log2(m));
    this.#firstRadix = m < 4 ? m : log % 2 === 1 ? 8 : 4;
    const stages: Float64Array[] = [];
    const halves: number[] = [];
    for (let h = Math.max(1, this.#firstRadix); h * 4 <= m; h *= 4) {
      const table = new Float64Array(6 * h);
      for (let j = 0; j < h; j++) {
        for (let p = 1; p <= 3; p++) {
          const angle = (-2 * Math.PI * p * j) / (4 * h);
          table[6 * j + 2 * (p - 1)] = Math.cos(angle);
          table[6 * j + 2 * (p - 1) + 1] = Math.sin(angle);
        }
      }
      stages.push(table);
      halves.push(h);
    }
    this.#stages = stages;
    this.#stageHalf = Int32Array.from(halves);
    const quarter = Math.floor(m / 2);
    this.#splitCos = new Float64Array(quarter + 1);
    this.#splitSin = new Float64Array(quarter + 1);
    for (let k = 0; k <= quarter; k++) {
      this.#splitCos[k] = Math.cos((2 * Math.PI * k) / size);
      this.#splitSin[k] = Math.sin((2 * Math.PI * k) / size);
    }
  }

  /**
   * Transforms `data` (N real samples) in place into the packed one-sided
   * spectrum described on the class, and returns it.
   */
  forward(data: Float64Array): Float64Array {
    this.#checkLength(data);
    const z = this.#scratch;
    this.#complexForward(data, z);
    this.#splitForward(z, data);
    return data;
  }

  /**
   * The inverse of {@link RealFft.forward}: turns a packed spectrum back into
   * N real samples, in place, x_n = (1/N)·Σ_k X_k·e^{+2πikn/N}.
   */
  inverse(data: Float64Array): Float64Array {
    this.#checkLength(data);
    this.#splitInverse(data);
    // inverse complex FFT by conjugation: ifft(Z) = conj(fft(conj Z)) / M
    const m = this.#half;
    const z = this.#scratch;
    for (let i = 1; i < 2 * m; i += 2) data[i] = -(data[i] as number);
    this.#complexForward(data, z);
    const scale = 1 / m;
    for (let i = 0; i < 2 * m; i += 2) {
      data[i] = (z[i] as number) * scale;
      data[i + 1] = -(z[i + 1] as number) * scale;
    }
    return data;
  }

  #checkLength(data: Float64Array): void {
    if (!(data instanceof Float64Array)) throw new SampleError("RealFft", "data", data, `a Float64Array of length ${this.size}`);
    if (data.length !== this.size) throw new DimensionError("RealFft", "data", this.size, data.length);
  }

  /** Complex FFT of the M interleaved points of `src` into `dst` (src is left unchanged). */
  #complexForward(src: Float64Array, dst: Float64Array): void {
    const n2 = 2 * this.#half;
    const rev = this.#reversed;
    switch (this.#firstRadix) {
      case 8:
        radix8First(src, dst, rev, n2);
        break;
      case 4:
        radix4First(src, dst, rev, n2);
        break;
      case 2: {
        const ar = src[0] as number, ai = src[1] as number, br = src[2] as number, bi = src[3] as number;
        dst[0] = ar + br;
        dst[1] = ai + bi;
        dst[2] = ar - br;
        dst[3] = ai - bi;
        break;
      }
      default:
        dst[0] = src[0] as number;
        dst[1] = src[1] as number;
    }
    const stages = this.#stages;
    for (let s = 0; s < stages.length; s++) radix4Stage(dst, n2, this.#stageHalf[s] as number, stages[s] as Float64Array);
  }

  /** Split step: complex spectrum Z (in `z`) of the packed halves → one-sided real spectrum X (packed, into `d`). */
  #splitForward(z: Float64Array, d: Float64Array): void {
    const m = this.#half;
    const z0r = z[0] as number;
    const z0i = z[1] as number;
    d[0] = z0r + z0i; // X_0
    d[1] = z0r - z0i; // X_M (Nyquist)
    const cos = this.#splitCos;
    const sin = this.#splitSin;
    for (let k = 1, j = m - 1; k <= j; k++, j--) {
      const ar = z[2 * k] as number;
      const ai = z[2 * k + 1] as number;
      const br = z[2 * j] as number;
      const bi = z[2 * j + 1] as number;
      // E = (Z_k + conj Z_j)/2 ; O = (Z_k − conj Z_j)/(2i)
      const er = 0.5 * (ar + br);
      const ei = 0.5 * (ai - bi);
      const or = 0.5 * (ai + bi);
      const oi = -0.5 * (ar - br);
      // W^k = cos − i·sin  (W = e^{−2πi/N})
      const c = cos[k] as number;
      const sn = sin[k] as number;
      const tr = or * c + oi * sn;
      const ti = oi * c - or * sn;
      d[2 * k] = er + tr;
      d[2 * k + 1] = ei + ti;
      d[2 * j] = er - tr;
      d[2 * j + 1] = ti - ei;
    }
  }

  /** Inverse of the split step, in place: one-sided spectrum X (packed) → Z of the packed halves. */
  #splitInverse(d: Float64Array): void {
    const m = this.#half;
    const x0 = d[0] as number;
    const xm = d[1] as number;
    d[0] = 0.5 * (x0 + xm);
    d[1] = 0.5 * (x0 - xm);
    const cos = this.#splitCos;
    const sin = this.#splitSin;
    for (let k = 1, j = m - 1; k <= j; k++, j--) {
      const ar = d[2 * k] as number;
      const ai = d[2 * k + 1] as number;
      const br = d[2 * j] as number;
      const bi = d[2 * j + 1] as number;
      // E = (X_k + conj X_j)/2 ; T = W^k·O = (X_k − conj X_j)/2
      const er = 0.5 * (ar + br);
      const ei = 0.5 * (ai - bi);
      const tr = 0.5 * (ar - br);
      const ti = 0.5 * (ai + bi);
      // O = conj(W^k)·T, conj(W^k) = cos + i·sin
      const c = cos[k] as number;
      const sn = sin[k] as number;
      const or = tr * c - ti * sn;
      const oi = tr * sn + ti * c;
      // Z_k = E + i·O ; Z_j = conj E + i·conj O
      d[2 * k] = er - oi;
      d[2 * k + 1] = ei + or;
      d[2 * j] = er + oi;
      d[2 * j + 1] = or - ei;
    }
  }
}

/** True for 1, 2, 4, 8, ... */
export function isPowerOfTwo(n: number): boolean {
  return Number.isInteger(n) && n >= 1 && (n & (n - 1)) === 0 && n <= 2 ** 30;
}

const SQRT_HALF = Math.SQRT1_2;

/**
 * First stage, radix 4 (h = 1, all twiddles 1), fused with the bit reversal:
 * reads four points in bit-reversed order from `src`, writes the butterfly's
 * outputs in natural order into `dst`.
 */
function radix4First(src: Float64Array, dst: Float64Array, rev: Int32Array, n2: number): void {
  for (let i0 = 0, p = 0; i0 < n2; i0 += 8, p += 4) {
    const r0 = rev[p] as number, r1 = rev[p + 1] as number, r2 = rev[p + 2] as number, r3 = rev[p + 3] as number;
    const x0r = src[r0] as number, x0i = src[r0 + 1] as number;
    const x1r = src[r1] as number, x1i = src[r1 + 1] as number;
    const x2r = src[r2] as number, x2i = src[r2 + 1] as number;
    const x3r = src[r3] as number, x3i = src[r3 + 1] as number;
    const ar = x0r + x1r, ai = x0i + x1i;
    const br = x0r - x1r, bi = x0i - x1i;
    const cr = x2r + x3r, ci = x2i + x3i;
    const er = x2r - x3r, ei = x2i - x3i;
    dst[i0] = ar + cr;
    dst[i0 + 1] = ai + ci;
    dst[i0 + 2] = br + ei;
    dst[i0 + 3] = bi - er;
    dst[i0 + 4] = ar - cr;
    dst[i0 + 5] = ai - ci;
    dst[i0 + 6] = br - ei;
    dst[i0 + 7] = bi + er;
  }
}

/**
 * First stage, radix 8 (three radix-2 stages h = 1, 2, 4 fused; twiddles 1,
 * −i and W_8 = (1 − i)/√2, W_8³ = −(1 + i)/√2), fused with the bit reversal.
 */
function radix8First(src: Float64Array, dst: Float64Array, rev: Int32Array, n2: number): void {
  for (let i0 = 0, p = 0; i0 < n2; i0 += 16, p += 8) {
    let q = rev[p] as number;
    const p0r = src[q] as number, p0i = src[q + 1] as number;
    q = rev[p + 1] as number;
    const p1r = src[q] as number, p1i = src[q + 1] as number;
    q = rev[p + 2] as number;
    const p2r = src[q] as number, p2i = src[q + 1] as number;
    q = rev[p + 3] as number;
    const p3r = src[q] as number, p3i = src[q + 1] as number;
    q = rev[p + 4] as number;
    const p4r = src[q] as number, p4i = src[q + 1] as number;
    q = rev[p + 5] as number;
    const p5r = src[q] as number, p5i = src[q + 1] as number;
    q = rev[p + 6] as number;
    const p6r = src[q] as number, p6i = src[q + 1] as number;
    q = rev[p + 7] as number;
    const p7r = src[q] as number, p7i = src[q + 1] as number;
    // h = 1
    const a0r = p0r + p1r, a0i = p0i + p1i, a1r = p0r - p1r, a1i = p0i - p1i;
    const a2r = p2r + p3r, a2i = p2i + p3i, a3r = p2r - p3r, a3i = p2i - p3i;
    const a4r = p4r + p5r, a4i = p4i + p5i, a5r = p4r - p5r, a5i = p4i - p5i;
    const a6r = p6r + p7r, a6i = p6i + p7i, a7r = p6r - p7r, a7i = p6i - p7i;
    // h = 2: b1 = a1 − i·a3, b3 = a1 + i·a3 (−i·(x + iy) = y − ix)
    const b0r = a0r + a2r, b0i = a0i + a2i, b2r = a0r - a2r, b2i = a0i - a2i;
    const b1r = a1r + a3i, b1i = a1i - a3r, b3r = a1r - a3i, b3i = a1i + a3r;
    const b4r = a4r + a6r, b4i = a4i + a6i, b6r = a4r - a6r, b6i = a4i - a6i;
    const b5r = a5r + a7i, b5i = a5i - a7r, b7r = a5r - a7i, b7i = a5i + a7r;
    // h = 4: twiddles on b5 (W_8), b6 (−i), b7 (W_8³)
    const t5r = SQRT_HALF * (b5r + b5i), t5i = SQRT_HALF * (b5i - b5r);
    const t6r = b6i, t6i = -b6r;
    const t7r = SQRT_HALF * (b7i - b7r), t7i = -SQRT_HALF * (b7r + b7i);
    dst[i0] = b0r + b4r;
    dst[i0 + 1] = b0i + b4i;
    dst[i0 + 2] = b1r + t5r;
    dst[i0 + 3] = b1i + t5i;
    dst[i0 + 4] = b2r + t6r;
    dst[i0 + 5] = b2i + t6i;
    dst[i0 + 6] = b3r + t7r;
    dst[i0 + 7] = b3i + t7i;
    dst[i0 + 8] = b0r - b4r;
    dst[i0 + 9] = b0i - b4i;
    dst[i0 + 10] = b1r - t5r;
    dst[i0 + 11] = b1i - t5i;
    dst[i0 + 12] = b2r - t6r;
    dst[i0 + 13] = b2i - t6i;
    dst[i0 + 14] = b3r - t7r;
    dst[i0 + 15] = b3i - t7i;
  }
}

/**
 * One radix-4 decimation-in-time stage on bit-reversed data, blocks of 4h
 * points: with w1 = W_{4h}^j, w2 = w1², w3 = w1³ and inputs x0..x3 at j,
 * j+h, j+2h, j+3h:
 *   a = x0 + w2·x1, b = x0 − w2·x1, c = w1·x2 + w3·x3, e = w1·x2 − w3·x3,
 *   y_j = a + c, y_{j+2h} = a − c, y_{j+h} = b − i·e, y_{j+3h} = b + i·e.
 */
function radix4Stage(d: Float64Array, n2: number, h: number, tw: Float64Array): void {
  const step = 8 * h; // interleaved length of one block of 4h points
  const q = 2 * h;
  for (let j = 0; j < h; j++) {
    const w1r = tw[6 * j] as number, w1i = tw[6 * j + 1] as number;
    const w2r = tw[6 * j + 2] as number, w2i = tw[6 * j + 3] as number;
    const w3r = tw[6 * j + 4] as number, w3i = tw[6 * j + 5] as number;
    for (let i0 = 2 * j; i0 < n2; i0 += step) {
      const i1 = i0 + q, i2 = i1 + q, i3 = i2 + q;
      const x0r = d[i0] as number, x0i = d[i0 + 1] as number;
      const y1r = d[i1] as number, y1i = d[i1 + 1] as number;
      const y2r = d[i2] as number, y2i = d[i2 + 1] as number;
      const y3r = d[i3] as number, y3i = d[i3 + 1] as number;
      const x1r = y1r * w2r - y1i * w2i, x1i = y1r * w2i + y1i * w2r;
      const x2r = y2r * w1r - y2i * w1i, x2i = y2r * w1i + y2i * w1r;
      const x3r = y3r * w3r - y3i * w3i, x3i = y3r * w3i + y3i * w3r;
      const ar = x0r + x1r, ai = x0i + x1i;
      const br = x0r - x1r, bi = x0i - x1i;
      const cr = x2r + x3r, ci = x2i + x3i;
      const er = x2r - x3r, ei = x2i - x3i;
      d[i0] = ar + cr;
      d[i0 + 1] = ai + ci;
      d[i1] = br + ei;
      d[i1 + 1] = bi - er;
      d[i2] = ar - cr;
      d[i2 + 1] = ai - ci;
      d[i3] = br - ei;
      d[i3 + 1] = bi + er;
    }
  }
}

/** Interleaved offsets 2·rev(i) of the bit-reversal permutation of m points. */
function bitReversedOffsets(m: number): Int32Array {
  const bits = Math.round(Math.log2(m));
  const out = new Int32Array(m);
  for (let i = 0; i < m; i++) {
    let r = 0;
    for (let b = 0, v = i; b < bits; b++, v >>= 1) r = (r << 1) | (v & 1);
    out[i] = 2 * r;
  }
  return out;
}
