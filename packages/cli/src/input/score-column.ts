import type { CliStreams } from "../io.js";
import { openInput } from "../io.js";
import { readLines } from "./lines.js";
import { readSamples } from "./samples.js";

/**
 * Reads one column of scores (the live score of a scores-mode stream, or the
 * named column) into memory, for calibration (which resamples them).
 */
export async function readScoreColumn(path: string, io: CliStreams, column?: string): Promise<{ name: string; scores: Float64Array; columnName: string }> {
  const input = await openInput(path, io);
  let scores = new Float64Array(1024);
  let n = 0;
  let columnName = "";
  const lines = readLines(input.chunks, { name: input.name });
  for await (const batch of readSamples(lines, { name: input.name, mode: "scores", ...(column === undefined ? {} : { columns: [column] }) })) {
    columnName = batch.layout.liveColumn ?? column ?? "";
    for (const row of batch.rows) {
      if (n === scores.length) {
        const grown = new Float64Array(n * 2);
        grown.set(scores);
        scores = grown;
      }
      scores[n++] = row.values[0] as number;
    }
  }
  return { name: input.name, scores: scores.slice(0, n), columnName };
}
