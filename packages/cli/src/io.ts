import { createReadStream, createWriteStream, type WriteStream } from "node:fs";
import { mkdir, readdir, readFile, rename, rm, stat } from "node:fs/promises";
import { dirname, resolve } from "node:path";
import type { Writable } from "node:stream";
import { InputError, UsageError } from "./exit-codes.js";

/** The streams and context the command runs with (injected, so tests run it in-process). */
export interface CliStreams {
  stdin: AsyncIterable<Buffer | string>;
  stdout: Writable;
  stderr: Writable;
  /** Draw the progress bar (stderr is a terminal). */
  stderrIsTTY: boolean;
  /** Directory relative paths are resolved against. */
  cwd: string;
  /**
   * Aborted when the process is asked to stop (SIGINT, SIGTERM; the reason is
   * the signal's name): a long command stops at its next batch, says so and
   * names what it leaves behind.
   */
  signal?: AbortSignal;
}

/**
 * Prepares an output folder for a run: files of an earlier run there (any of
 * `names`, or their `.partial` leftovers) are refused, so that a new run
 * never sits beside an old run's complete-looking files, unless `force`, in
 * which case they are removed before the run starts.
 */
export async function prepareOutputFolder(dir: string, names: readonly string[], force: boolean, flagHint: string): Promise<void> {
  await mkdir(dir, { recursive: true }).catch((e: NodeJS.ErrnoException) => {
    throw new InputError(`${dir}: cannot create the output folder (${e.code ?? e.message})`);
  });
  const present = (await readdir(dir)).filter((f) => names.some((n) => f === n || f === `${n}.partial`)).sort();
  if (present.length === 0) return;
  if (!force) throw new UsageError(`${dir} already holds the output of an earlier run (${present.join(", ")}); choose another folder, or add ${flagHint} to replace it`);
  for (const f of present) await rm(resolve(dir, f), { force: true });
}

/** An input stream opened from a path, or from stdin for "-". */
export interface OpenedInput {
  /** Name for messages: the path as given, or "stdin". */
  name: string;
  chunks: AsyncIterable<Buffer | string>;
  /** Size in bytes when known (a regular file), for the progress bar. */
  size: number | null;
}

/** Opens `path` ("-" = standard input) for streaming; a missing or unreadable file is an {@link InputError}. */
export async function openInput(path: string, io: CliStreams): Promise<OpenedInput> {
  if (path === "-") return { name: "stdin", chunks: io.stdin, size: null };
  const full = resolve(io.cwd, path);
  let size: number;
  try {
    const s = await stat(full);
    if (s.isDirectory()) throw new InputError(`${path}: is a directory; expected a file`);
    size = s.size;
  } catch (error) {
    if (error instanceof InputError) throw error;
    throw new InputError(`${path}: cannot read it (${(error as NodeJS.ErrnoException).code ?? String(error)})`);
  }
  return { name: path, chunks: createReadStream(full, { highWaterMark: 1 << 18 }), size };
}

/** Reads a whole small file (a config or labels file) as text. */
export async function readTextFile(path: string, io: CliStreams): Promise<string> {
  try {
    return await readFile(resolve(io.cwd, path), "utf8");
  } catch (error) {
    throw new InputError(`${path}: cannot read it (${(error as NodeJS.ErrnoException).code ?? String(error)})`);
  }
}

/**
 * Buffered text output with back-pressure: text is gathered into chunks of
 * about 64 KiB and written; when the stream's buffer is full, `write` waits
 * for it to drain, so output of any length takes constant memory.
 */
export class TextSink {
  readonly #stream: Writable;
  #parts: string[] = [];
  #size = 0;
  constructor(stream: Writable) {
    this.#stream = stream;
  }
  /** Queues text; the returned promise (when there is one) resolves when it is safe to write more. */
  write(text: string): Promise<void> | undefined {
    this.#parts.push(text);
    this.#size += text.length;
    return this.#size >= 1 << 16 ? this.flush() : undefined;
  }
  /** Writes what is queued and waits until the stream can take more. */
  async flush(): Promise<void> {
    if (this.#parts.length === 0) return;
    const text = this.#parts.join("");
    this.#parts = [];
    this.#size = 0;
    if (!this.#stream.write(text)) {
      await new Promise<void>((ok, fail) => {
        const onError = (e: Error): void => fail(e);
        this.#stream.once("error", onError);
        this.#stream.once("drain", () => {
          this.#stream.off("error", onError);
          ok();
        });
      });
    }
  }
}

/**
 * A file written under `<path>.partial` and renamed to `path` only by
 * {@link PartialFile.commit}, so a run that stops on an error never leaves a
 * file that looks complete.
 */
export class PartialFile {
  readonly path: string;
  readonly partialPath: string;
  readonly stream: WriteStream;
  readonly sink: TextSink;
  private constructor(path: string, stream: WriteStream) {
    this.path = path;
    this.partialPath = `${path}.partial`;
    this.stream = stream;
    this.sink = new TextSink(stream);
  }
  static async create(path: string): Promise<PartialFile> {
    await mkdir(dirname(path), { recursive: true });
    const stream = createWriteStream(`${path}.partial`);
    await new Promise<void>((ok, fail) => {
      stream.once("open", () => ok());
      stream.once("error", (e) => fail(new InputError(`${path}: cannot write it (${(e as NodeJS.ErrnoException).code ?? e.message})`)));
    });
    return new PartialFile(path, stream);
  }
  async #close(): Promise<void> {
    await this.sink.flush();
    await new Promise<void>((ok, fail) => this.stream.end((e?: Error | null) => (e ? fail(e) : ok())));
  }
  /** Flushes, closes and renames the file to its final name. */
  async commit(): Promise<void> {
    await this.#close();
    await rename(this.partialPath, this.path);
  }
  /** Flushes and closes, leaving `<path>.partial` in place (after an input error). */
  async abandon(): Promise<void> {
    await this.#close().catch(() => undefined);
  }
  /** Removes the partial file. */
  async discard(): Promise<void> {
    await this.abandon();
    await rm(this.partialPath, { force: true });
  }
}

/** Writes a whole text file through a `.partial` name and a rename. */
export async function writeWholeFile(path: string, text: string): Promise<void> {
  const file = await PartialFile.create(path);
  await file.sink.write(text);
  await file.commit();
}
