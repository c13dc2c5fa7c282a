import { mkdirSync, writeFileSync } from "node:fs";
import { fileURLToPath } from "node:url";

/** One row of bench/results/<package>.json. */
export interface BenchRow {
  name: string;
  nsPerOp: number;
  baselineNsPerOp: number;
  ratio: number;
  /** Free-form extra numbers (samples per second, sizes, ...). */
  note?: string;
}

let sink = 0;

/** Keeps a value alive so the optimizer cannot drop the work that made it. */
export function consume(value: number): void {
  sink += value;
  if (sink === 0.123456789) console.log("");
}

/**
 * Median nanoseconds per operation of `run`, which performs `opsPerRun`
 * operations per call. Each of `repeats` timings runs `run` in a loop for at
 * least `minMs` milliseconds, after a warm-up of the same length.
 */
export function nsPerOp(run: () => void, opsPerRun: number, options: { minMs?: number; repeats?: number } = {}): number {
  const minNs = (options.minMs ?? 150) * 1e6;
  const repeats = options.repeats ?? 7;
  const once = (): number => {
    let calls = 0;
    const start = process.hrtime.bigint();
    let elapsed = 0;
    do {
      run();
      calls++;
      elapsed = Number(process.hrtime.bigint() - start);
    } while (elapsed < minNs);
    return elapsed / (calls * opsPerRun);
  };
  once();
  const times: number[] = [];
  for (let r = 0; r < repeats; r++) times.push(once());
  times.sort((a, b) => a - b);
  return times[Math.floor(times.length / 2)] as number;
}

/** The baseline of every ratio: a loop that only sums the same Float64Array. */
export function sumLoop(xs: Float64Array): number {
  let s = 0;
  for (let i = 0; i < xs.length; i++) s += xs[i] as number;
  return s;
}

/** The honest baseline of the change rows: a sum of the same Float64Array with four accumulators. */
export function sumLoop4(xs: Float64Array): number {
  let a = 0;
  let b = 0;
  let c = 0;
  let d = 0;
  const end = xs.length & ~3;
  let i = 0;
  for (; i < end; i += 4) {
    a += xs[i] as number;
    b += xs[i + 1] as number;
    c += xs[i + 2] as number;
    d += xs[i + 3] as number;
  }
  for (; i < xs.length; i++) a += xs[i] as number;
  return a + b + (c + d);
}

/** Nanoseconds per element of {@link sumLoop} over `xs`, timed now. */
export function sumBaselineNs(xs: Float64Array): number {
  return nsPerOp(() => consume(sumLoop(xs)), xs.length);
}

/** Collects rows for one package, prints a table and writes bench/results/<package>.json. */
export class BenchReport {
  readonly #pkg: string;
  readonly #rows: BenchRow[] = [];
  constructor(pkg: string) {
    this.#pkg = pkg;
  }
  add(name: string, nsPerOpValue: number, baselineNsPerOp: number, note?: string): BenchRow {
    const row: BenchRow = { name, nsPerOp: nsPerOpValue, baselineNsPerOp, ratio: nsPerOpValue / baselineNsPerOp };
    if (note !== undefined) row.note = note;
    this.#rows.push(row);
    return row;
  }
  get rows(): readonly BenchRow[] {
    return this.#rows;
  }
  write(): void {
    const dir = fileURLToPath(new URL("./results/", import.meta.url));
    mkdirSync(dir, { recursive: true });
    writeFileSync(`${dir}${this.#pkg}.json`, JSON.stringify(this.#rows, null, 2) + "\n");
    const lines = [`\n${this.#pkg}`, `${"name".padEnd(52)} ${"ns/op".padStart(12)} ${"base ns/op".padStart(11)} ${"ratio".padStart(8)}  note`];
    for (const r of this.#rows) {
      lines.push(`${r.name.padEnd(52)} ${r.nsPerOp.toFixed(2).padStart(12)} ${r.baselineNsPerOp.toFixed(3).padStart(11)} ${r.ratio.toFixed(2).padStart(8)}  ${r.note ?? ""}`);
    }
    console.log(lines.join("\n"));
  }
}
