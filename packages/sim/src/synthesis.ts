/**
 * Adds amp·sin(φ + ω·n) to buf[0..N−1] by the Chebyshev recurrence
 * s_{n+1} = 2cos(ω)·s_n − s_{n−1} (Goertzel-style oscillator: two
 * multiplications per sample, no trigonometric call in the loop). Tones at
 * or above the Nyquist frequency (ω ≥ π) and zero amplitudes are skipped.
 * @param omega ω = 2π·f/f_s, radians per sample
 */
export function addTone(buf: Float64Array, omega: number, amp: number, phase: number): void {
  if (amp === 0 || !(omega > 0 && omega < Math.PI)) return;
  const n = buf.length;
  const c2 = 2 * Math.cos(omega);
  let s0 = amp * Math.sin(phase);
  let s1 = amp * Math.sin(phase + omega);
  buf[0] = (buf[0] as number) + s0;
  if (n > 1) buf[1] = (buf[1] as number) + s1;
  for (let i = 2; i < n; i++) {
    const s2 = c2 * s1 - s0;
    buf[i] = (buf[i] as number) + s2;
    s0 = s1;
    s1 = s2;
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
