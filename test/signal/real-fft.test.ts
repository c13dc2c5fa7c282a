import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { RealFft } from "@leeway/signal";
import { expectLeewayError } from "../support/errors.js";

/** X_k by the O(N²) definition Σ x_n·e^{−2πikn/N}, k = 0..N/2. */
function naiveDft(x: Float64Array): { re: Float64Array; im: Float64Array } {
  const n = x.length;
  const re = new Float64Array(n / 2 + 1);
  const im = new Float64Array(n / 2 + 1);
  for (let k = 0; k <= n / 2; k++) {
    let sr = 0;
    let si = 0;
    for (let t = 0; t < n; t++) {
      const angle = (-2 * Math.PI * ((k * t) % n)) / n;
      sr += (x[t] as number) * Math.cos(angle);
      si += (x[t] as number) * Math.sin(angle);
    }
    re[k] = sr;
    im[k] = si;
  }
  return { re, im };
}

/** Unpacks RealFft's layout into (re, im) for k = 0..N/2. */
function unpack(d: Float64Array): { re: Float64Array; im: Float64Array } {
  const n = d.length;
  const re = new Float64Array(n / 2 + 1);
  const im = new Float64Array(n / 2 + 1);
  re[0] = d[0] as number;
  re[n / 2] = d[1] as number;
  for (let k = 1; k < n / 2; k++) {
    re[k] = d[2 * k] as number;
    im[k] = d[2 * k + 1] as number;
  }
  return { re, im };
}

const frames = fc
  .integer({ min: 1, max: 10 })
  .chain((log) => fc.array(fc.double({ min: -1e3, max: 1e3, noNaN: true }), { minLength: 2 ** log, maxLength: 2 ** log }))
  .map((xs) => Float64Array.from(xs));

describe("RealFft", () => {
  it("forward equals the naive DFT, relative error ≤ 1e-9 of the spectrum's largest magnitude, for N = 2..1024", () => {
    fc.assert(
      fc.property(frames, (x) => {
        const expected = naiveDft(x);
        const got = unpack(new RealFft(x.length).forward(Float64Array.from(x)));
        let scale = 0;
        for (let k = 0; k < expected.re.length; k++) scale = Math.max(scale, Math.hypot(expected.re[k] as number, expected.im[k] as number));
        scale = Math.max(scale, 1e-300);
        for (let k = 0; k < expected.re.length; k++) {
          const err = Math.hypot((got.re[k] as number) - (expected.re[k] as number), (got.im[k] as number) - (expected.im[k] as number));
          expect(err / scale).toBeLessThanOrEqual(1e-9);
        }
      }),
      { numRuns: 60 },
    );
  });

  it("Parseval: Σx² = (1/N)·(|X_0|² + |X_{N/2}|² + 2·Σ_{0<k<N/2}|X_k|²)", () => {
    fc.assert(
      fc.property(frames, (x) => {
        const n = x.length;
        let energy = 0;
        for (const v of x) energy += v * v;
        const d = new RealFft(n).forward(Float64Array.from(x));
        let spectral = (d[0] as number) ** 2 + (n > 1 ? (d[1] as number) ** 2 : 0);
        for (let k = 1; k < n / 2; k++) spectral += 2 * ((d[2 * k] as number) ** 2 + (d[2 * k + 1] as number) ** 2);
        spectral /= n;
        expect(Math.abs(spectral - energy)).toBeLessThanOrEqual(1e-9 * Math.max(energy, 1e-300) + 1e-300);
      }),
      { numRuns: 80 },
    );
  });

  it("inverse(forward(x)) returns x (relative error ≤ 1e-12)", () => {
    fc.assert(
      fc.property(frames, (x) => {
        const fft = new RealFft(x.length);
        const y = fft.inverse(fft.forward(Float64Array.from(x)));
        let scale = 1e-300;
        for (const v of x) scale = Math.max(scale, Math.abs(v));
        for (let i = 0; i < x.length; i++) expect(Math.abs((y[i] as number) - (x[i] as number)) / scale).toBeLessThanOrEqual(1e-12);
      }),
      { numRuns: 60 },
    );
  });

  it("is linear: F(a·x + y) = a·F(x) + F(y)", () => {
    fc.assert(
      fc.property(frames, fc.double({ min: -10, max: 10, noNaN: true }), (x, a) => {
        const n = x.length;
        const y = Float64Array.from(x, (v, i) => Math.cos(v + i));
        const fft = new RealFft(n);
        const combined = fft.forward(Float64Array.from(x, (v, i) => a * v + (y[i] as number)));
        const fx = fft.forward(Float64Array.from(x));
        const fy = fft.forward(y);
        let scale = 1e-300;
        for (let i = 0; i < n; i++) scale = Math.max(scale, Math.abs(combined[i] as number), Math.abs(a * (fx[i] as number)));
        for (let i = 0; i < n; i++) expect(Math.abs((combined[i] as number) - (a * (fx[i] as number) + (fy[i] as number))) / scale).toBeLessThanOrEqual(1e-11);
      }),
      { numRuns: 40 },
    );
  });

  it("a unit impulse at n = 1 gives X_k = e^{−2πik/N}", () => {
    const n = 64;
    const x = new Float64Array(n);
    x[1] = 1;
    const { re, im } = unpack(new RealFft(n).forward(x));
    for (let k = 0; k <= n / 2; k++) {
      expect(re[k]).toBeCloseTo(Math.cos((-2 * Math.PI * k) / n), 14);
      expect(im[k]).toBeCloseTo(k === n / 2 ? 0 : Math.sin((-2 * Math.PI * k) / n), 14);
    }
  });

  it("refuses sizes that are not powers of two in [2, 2^24], and frames of the wrong length", () => {
    for (const bad of [0, 1, 3, 6, 1000, 1023, -8, 2.5, Number.NaN, 2 ** 25]) expectLeewayError(() => new RealFft(bad), "E_OPTION", "RealFft", "size", "power of two");
    expectLeewayError(() => new RealFft(8).forward(new Float64Array(7)), "E_DIMENSION", "data", "length 8", "length 7");
    expectLeewayError(() => new RealFft(8).inverse(new Float64Array(16)), "E_DIMENSION", "data", "length 8");
    expectLeewayError(() => new RealFft(8).forward([1, 2, 3, 4, 5, 6, 7, 8] as never), "E_SAMPLE", "data", "Float64Array", "(array)");
  });
  it("the documented example: eight ones give X_0 = 8 and zeros, and invert back", () => {
    const fft = new RealFft(8);
    const x = Float64Array.from([1, 1, 1, 1, 1, 1, 1, 1]);
    fft.forward(x);
    expect(x[0]).toBe(8);
    for (let i = 1; i < 8; i++) expect(Math.abs(x[i] as number)).toBeLessThan(1e-15);
    fft.inverse(x);
    for (const v of x) expect(v).toBeCloseTo(1, 15);
  });
});
