import { mkdirSync, writeFileSync } from "node:fs";
import { fileURLToPath } from "node:url";

/** Minimum, median and maximum of one measure over the rounds. */
export interface Spread {
  min: number;
  median: number;
  max: number;
}

/** Nanoseconds per operation over several rounds, by process CPU time and by wall time. */
export interface RoundTimes {
  cpu: Spread;
  wall: Spread;
}

/**
 * Times `run` (which performs `opsPerRun` operations) in `rounds` rounds of at least `minMs`
 * each, after one warm-up round, and gives nanoseconds per operation by process CPU time
 * (`process.cpuUsage()`, user + system) and by wall time, as min/median/max over the rounds.
 */
export function timeRounds(run: () => void, opsPerRun: number, options: { rounds?: number; minMs?: number } = {}): RoundTimes {
  const rounds = options.rounds ?? 7;
  const minNs = (options.minMs ?? 100) * 1e6;
  const once = (): { cpu: number; wall: number } => {
    let calls = 0;
    const cpu0 = process.cpuUsage();
    const wall0 = process.hrtime.bigint();
    let wall = 0;
    do {
      run();
      calls++;
      wall = Number(process.hrtime.bigint() - wall0);
    } while (wall < minNs);
    const used = process.cpuUsage(cpu0);
    const ops = calls * opsPerRun;
    return { cpu: ((used.user + used.system) * 1000) / ops, wall: wall / ops };
  };
  once();
  const cpu: number[] = [];
  const wall: number[] = [];
  for (let r = 0; r < rounds; r++) {
    const t = once();
    cpu.push(t.cpu);
    wall.push(t.wall);
  }
  return { cpu: spread(cpu), wall: spread(wall) };
}

function spread(values: number[]): Spread {
  const s = [...values].sort((a, b) => a - b);
  return { min: s[0] as number, median: s[s.length >> 1] as number, max: s[s.length - 1] as number };
}

/** One row of a rounds report: a name, the times per operation and a note. */
export interface RoundsRow {
  name: string;
  unit: string;
  times: RoundTimes;
  /** Ratio of the medians (wall and CPU) to the baseline row's, when a baseline was given. */
  ratio?: { cpu: number; wall: number };
  note?: string;
}

/** Collects timed rows, prints them and writes bench/results/<name>.json. */
export class RoundsReport {
  readonly #name: string;
  readonly #rows: RoundsRow[] = [];
  constructor(name: string) {
    this.#name = name;
  }
  add(row: RoundsRow, baseline?: RoundTimes): void {
    if (baseline !== undefined) row.ratio = { cpu: row.times.cpu.median / baseline.cpu.median, wall: row.times.wall.median / baseline.wall.median };
    this.#rows.push(row);
  }
  write(): void {
    const dir = fileURLToPath(new URL("./results/", import.meta.url));
    mkdirSync(dir, { recursive: true });
    writeFileSync(`${dir}${this.#name}.json`, JSON.stringify(this.#rows, null, 2) + "\n");
    const f = (s: Spread): string => `${s.min.toFixed(1)}/${s.median.toFixed(1)}/${s.max.toFixed(1)}`.padStart(26);
    const lines = [`\n${this.#name} (ns per unit, min/median/max over rounds)`, `${"name".padEnd(46)} ${"unit".padEnd(8)} ${"cpu".padStart(26)} ${"wall".padStart(26)} ratio(cpu)`];
    for (const r of this.#rows) lines.push(`${r.name.padEnd(46)} ${r.unit.padEnd(8)} ${f(r.times.cpu)} ${f(r.times.wall)} ${r.ratio === undefined ? "" : r.ratio.cpu.toFixed(1)}  ${r.note ?? ""}`);
    console.log(lines.join("\n"));
  }
}
