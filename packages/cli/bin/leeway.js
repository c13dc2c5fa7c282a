#!/usr/bin/env node
// The `leeway` command. This file is committed so that `npm ci` can link it
// before anything is built; it runs the compiled command in dist/.
import { existsSync } from "node:fs";

const entry = new URL("../dist/bin.js", import.meta.url);
if (!existsSync(entry)) {
  process.stderr.write("leeway: the command is not built yet; run `npm run build` (or `npm test`) in the repository first.\n");
  process.exitCode = 4;
} else {
  await import(entry.href);
}
