#!/usr/bin/env node
import { main } from "./main.js";

// The one place that touches the process: arguments, streams, exit code.
process.stdout.on("error", (error: NodeJS.ErrnoException) => {
  if (error.code === "EPIPE") process.exit(0); // the reader went away (for example `| head`)
  throw error;
});
const code = await main(process.argv.slice(2), {
  stdin: process.stdin,
  stdout: process.stdout,
  stderr: process.stderr,
  stderrIsTTY: process.stderr.isTTY === true,
  cwd: process.cwd(),
});
process.exitCode = code;
