import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Readable, Writable } from "node:stream";
import { main } from "../../packages/cli/src/main.js";

/** What one in-process run of the command printed and returned. */
export interface CliRun {
  code: number;
  stdout: string;
  stderr: string;
}

/** A Writable that keeps what is written. */
export class Capture extends Writable {
  text = "";
  override _write(chunk: Buffer | string, _enc: BufferEncoding, done: (e?: Error | null) => void): void {
    this.text += typeof chunk === "string" ? chunk : chunk.toString("utf8");
    done();
  }
}

/** Runs `leeway <argv>` in-process with `stdin` as standard input (text or an iterable of chunks). */
export async function runCli(argv: string[], options: { stdin?: string | AsyncIterable<Buffer | string> | Iterable<Buffer | string>; cwd?: string; tty?: boolean; signal?: AbortSignal } = {}): Promise<CliRun> {
  const stdout = new Capture();
  const stderr = new Capture();
  const source = options.stdin ?? "";
  const stdin = typeof source === "string" ? Readable.from([Buffer.from(source)]) : Readable.from(source);
  const code = await main(argv, { stdin, stdout, stderr, stderrIsTTY: options.tty ?? false, cwd: options.cwd ?? process.cwd(), ...(options.signal === undefined ? {} : { signal: options.signal }) });
  return { code, stdout: stdout.text, stderr: stderr.text };
}

/** A fresh temporary directory. */
export function scratchDir(label: string): string {
  return mkdtempSync(join(tmpdir(), `leeway-cli-${label}-`));
}
