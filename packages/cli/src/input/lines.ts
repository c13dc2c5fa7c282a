import { StringDecoder } from "node:string_decoder";
import { InputError } from "../exit-codes.js";

/** A batch of consecutive lines of a text stream, without their line ends. */
export interface LineBatch {
  /** The lines, `\n` or `\r\n` removed. */
  lines: string[];
  /** 1-based number of `lines[0]` in the stream. */
  firstLine: number;
  /** Bytes of the stream consumed so far (for progress). */
  bytesRead: number;
}

/** Options of {@link readLines}. */
export interface ReadLinesOptions {
  /** Name of the stream in error messages (a path, or "stdin"). */
  name: string;
  /** Longest line accepted, in characters; a longer one is an input error (default 16 MiB). */
  maxLineLength?: number;
}

/**
 * Splits a byte stream into lines in constant memory: each chunk is decoded
 * (UTF-8, a character split across chunks is kept whole; a leading byte-order
 * mark is dropped), split at `\n`, and only the unfinished last line is carried
 * into the next chunk. Memory is bounded by the chunk size plus the longest line.
 * @example
 * for await (const batch of readLines(createReadStream("scores.csv"), { name: "scores.csv" })) {
 *   for (const line of batch.lines) handle(line);
 * }
 */
export async function* readLines(source: AsyncIterable<Buffer | string>, options: ReadLinesOptions): AsyncGenerator<LineBatch> {
  const maxLineLength = options.maxLineLength ?? 16 * 1024 * 1024;
  const decoder = new StringDecoder("utf8");
  let carry = "";
  let lineNumber = 1;
  let bytesRead = 0;
  let first = true;
  for await (const chunk of source) {
    bytesRead += typeof chunk === "string" ? Buffer.byteLength(chunk) : chunk.length;
    let text = carry + (typeof chunk === "string" ? chunk : decoder.write(chunk));
    if (first && text.length > 0) {
      if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
      first = false;
    }
    const lines = text.split("\n");
    carry = lines.pop() as string;
    if (carry.length > maxLineLength) {
      throw new InputError(`${options.name}:${lineNumber + lines.length}: line is longer than ${maxLineLength} characters; expected one record per line`);
    }
    if (lines.length === 0) continue;
    for (let i = 0; i < lines.length; i++) {
      const line = lines[i] as string;
      if (line.endsWith("\r")) lines[i] = line.slice(0, -1);
    }
    yield { lines, firstLine: lineNumber, bytesRead };
    lineNumber += lines.length;
  }
  carry += decoder.end();
  if (first && carry.charCodeAt(0) === 0xfeff) carry = carry.slice(1);
  if (carry.endsWith("\r")) carry = carry.slice(0, -1);
  if (carry.length > 0) yield { lines: [carry], firstLine: lineNumber, bytesRead };
}
