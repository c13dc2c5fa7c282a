/**
 * Adds amp·sin(φ + ω·n) to buf[0..N−1] by the Chebyshev recurrence
 * s_n = 2cos(4ω)·s_{n−4} − s_{n−8} on four interleaved lanes (independent
 * chains, so the additions pipeline; two operations per sample and no
 * trigonometric call in the loop). Tones at or above the Nyquist frequency
 * (ω ≥ π), at or below 0 Hz, and zero amplitudes are skipped.
 * @param omega ω = 2π·f/f_s, radians per sample
 */
export function addTone(buf: Float64Array, omega: number, amp: number, phase: number): void {
  if (amp === 0 || !(omega > 0 && omega < Math.PI)) return;
  const n = buf.length;
  const head = Math.min(n, 8);
  for (let i = 0; i < head; i++) buf[i] = (buf[i] as number) + amp * Math.sin(phase + omega * i);
  if (n <= 8) return;
  const c = 2 * Math.cos(4 * omega);
  let p0 = amp * Math.sin(phase), p1 = amp * Math.sin(phase + omega), p2 = amp * Math.sin(phase + 2 * omega), p3 = amp * Math.sin(phase + 3 * omega);
  let q0 = amp * Math.sin(phase + 4 * omega), q1 = amp * Math.sin(phase + 5 * omega), q2 = amp * Math.sin(phase + 6 * omega), q3 = amp * Math.sin(phase + 7 * omega);
  let i = 8;
  for (; i + 3 < n; i += 4) {
    const x0 = c * q0 - p0, x1 = c * q1 - p1, x2 = c * q2 - p2, x3 = c * q3 - p3;
    buf[i] = (buf[i] as number) + x0;
    buf[i + 1] = (buf[i + 1] as number) + x1;
    buf[i + 2] = (buf[i + 2] as number) + x2;
    buf[i + 3] = (buf[i + 3] as number) + x3;
    p0 = q0; p1 = q1; p2 = q2; p3 = q3;
    q0 = x0; q1 = x1; q2 = x2; q3 = x3;
  }
  for (; i < n; i++) buf[i] = (buf[i] as number) + amp * Math.sin(phase + omega * i);
}

/**
 * Adds src[n]·(1 + m·cos(ω·n + φ)) to buf (amplitude modulation of a
 * component at rate ω: sidebands ±ω of relative amplitude m/2), with the
 * cosine by the recurrence e_n = 2cos(ω)·e_{n−1} − e_{n−2}.
 */
export function addModulated(buf: Float64Array, src: Float64Array, omega: number, depth: number, phase: number): void {
  const n = Math.min(buf.length, src.length);
  if (n === 0) return;
  const c2 = 2 * Math.cos(omega);
  let e0 = depth * Math.cos(phase - omega); // e_{−1}
  let e1 = depth * Math.cos(phase); // e_0
  for (let i = 0; i < n; i++) {
    buf[i] = (buf[i] as number) + (src[i] as number) * (1 + e1);
    const e2 = c2 * e1 - e0;
    e0 = e1;
    e1 = e2;
  }
}

/**
 * Adds a decaying ringing amp·r^k·sin(ω·k) starting at sample `at` (an
 * impact exciting a structural resonance), until its envelope is below
 * 0.1 % of amp or the buffer ends, by the damped recurrence
 * y_{k+1} = 2r·cos(ω)·y_k − r²·y_{k−1}.
 * @param omega resonance, radians per sample
 * @param r per-sample decay factor in (0, 1)
 */
export function addRinging(buf: Float64Array, at: number, amp: number, omega: number, r: number): void {
  const n = buf.length;
  if (at < 0 || at >= n || amp === 0) return;
  const steps = Math.min(n - at, Math.ceil(Math.log(1e-3) / Math.log(r)));
  const a = 2 * r * Math.cos(omega);
  const b = r * r;
  let y0 = 0;
  let y1 = amp * r * Math.sin(omega);
  for (let k = 1; k < steps; k++) {
    buf[at + k] = (buf[at + k] as number) + y1;
    const y2 = a * y1 - b * y0;
    y0 = y1;
    y1 = y2;
  }
}
