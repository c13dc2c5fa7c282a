#!/usr/bin/env node
import { main } from "./main.js";

// The one place that touches the process: arguments, streams, signals, exit code.
process.stdout.on("error", (error: NodeJS.ErrnoException) => {
  if (error.code === "EPIPE") process.exit(0); // the reader went away (for example `| head`)
  throw error;
});
const argv = process.argv.slice(2);
// The streaming commands stop at their next batch on SIGINT/SIGTERM and say what they leave behind;
// a second signal ends the process at once. The others (demo, calibrate) compute without pausing and
// keep the default: they end at once.
const interrupt = new AbortController();
if (argv[0] === "replay" || argv[0] === "report") {
  for (const signal of ["SIGINT", "SIGTERM"] as const) {
    process.on(signal, () => {
      if (interrupt.signal.aborted) process.exit(signal === "SIGTERM" ? 143 : 130);
      interrupt.abort(signal);
    });
  }
}
const code = await main(argv, {
  stdin: process.stdin,
  stdout: process.stdout,
  stderr: process.stderr,
  stderrIsTTY: process.stderr.isTTY === true,
  cwd: process.cwd(),
  signal: interrupt.signal,
});
process.exitCode = code;
