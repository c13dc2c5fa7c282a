import type { Writable } from "node:stream";

/**
 * A one-line progress bar on stderr, drawn only when stderr is a terminal
 * (so logs and pipes stay clean): bytes read against the file size when it is
 * known, samples and samples per second in every case. Redrawn at most ten
 * times a second.
 */
export class ProgressBar {
  readonly #out: Writable;
  readonly #enabled: boolean;
  readonly #total: number | null;
  readonly #label: string;
  readonly #started = Date.now();
  #lastDraw = 0;
  #drawn = false;

  constructor(out: Writable, enabled: boolean, total: number | null, label: string) {
    this.#out = out;
    this.#enabled = enabled;
    this.#total = total !== null && total > 0 ? total : null;
    this.#label = label;
  }

  /** Reports progress; draws when enough time has passed since the last drawing. */
  update(bytes: number, samples: number): void {
    if (!this.#enabled) return;
    const now = Date.now();
    if (now - this.#lastDraw < 100) return;
    this.#lastDraw = now;
    const seconds = Math.max(1e-3, (now - this.#started) / 1000);
    const rate = `${compact(samples)} samples, ${compact(samples / seconds)}/s`;
    let line: string;
    if (this.#total !== null) {
      const f = Math.min(1, bytes / this.#total);
      const width = 28;
      const full = Math.round(f * width);
      line = `${this.#label} [${"#".repeat(full)}${"-".repeat(width - full)}] ${(100 * f).toFixed(0).padStart(3)}% ${rate}`;
    } else line = `${this.#label} ${rate}`;
    this.#out.write(`\r${line}\u001b[K`);
    this.#drawn = true;
  }

  /** Clears the bar's line. */
  done(): void {
    if (this.#drawn) this.#out.write("\r\u001b[K");
    this.#drawn = false;
  }
}

function compact(n: number): string {
  if (n >= 1e6) return `${(n / 1e6).toFixed(1)}M`;
  if (n >= 1e3) return `${(n / 1e3).toFixed(1)}k`;
  return n.toFixed(0);
}
