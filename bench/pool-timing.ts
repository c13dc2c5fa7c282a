/**
 * Timing for the pool benches: process CPU time (process.cpuUsage, user +
 * system) and wall time of the same loop, in rounds that alternate every run,
 * so a change of the machine's load hits all of them alike.
 */

/** Nanoseconds per operation of one timed loop, by CPU time and by wall time. */
export interface Timing {
  cpu: number;
  wall: number;
}

/** Runs `run` (which does `ops` operations) for at least `minMs` ms; ns per operation. */
export function timeOnce(run: () => void, ops: number, minMs: number): Timing {
  let calls = 0;
  const cpu0 = process.cpuUsage();
  const t0 = process.hrtime.bigint();
  let elapsed = 0;
  do {
    run();
    calls++;
    elapsed = Number(process.hrtime.bigint() - t0);
  } while (elapsed < minMs * 1e6);
  const cpu = process.cpuUsage(cpu0);
  return { cpu: ((cpu.user + cpu.system) * 1000) / (calls * ops), wall: elapsed / (calls * ops) };
}

/** One timed run: the loop and the operations it does per call. */
export interface Run {
  run: () => void;
  ops: number;
}

/** Times every run once per round, `rounds` times, after one warm-up each. */
export function interleave(runs: Record<string, Run>, rounds: number, minMs: number): Record<string, Timing[]> {
  const out: Record<string, Timing[]> = {};
  for (const [name, r] of Object.entries(runs)) {
    timeOnce(r.run, r.ops, minMs);
    out[name] = [];
  }
  for (let k = 0; k < rounds; k++) {
    for (const [name, r] of Object.entries(runs)) (out[name] as Timing[]).push(timeOnce(r.run, r.ops, minMs));
  }
  return out;
}

/** min / median / max of a list. */
export interface Spread {
  min: number;
  median: number;
  max: number;
}

export function spread(xs: number[]): Spread {
  const s = xs.slice().sort((a, b) => a - b);
  return { min: s[0] as number, median: s[Math.floor(s.length / 2)] as number, max: s[s.length - 1] as number };
}

/** Per-round ratio a/b of one clock, as min / median / max. */
export function ratio(a: Timing[], b: Timing[], clock: keyof Timing, scaleA = 1, scaleB = 1): Spread {
  return spread(a.map((t, r) => (t[clock] * scaleA) / (((b[r] as Timing)[clock] as number) * scaleB)));
}

/** "min / median / max" with `digits` decimals. */
export function show(s: Spread, digits = 2): string {
  return `${s.min.toFixed(digits)} / ${s.median.toFixed(digits)} / ${s.max.toFixed(digits)}`;
}
