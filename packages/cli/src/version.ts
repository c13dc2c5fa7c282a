import { readFileSync } from "node:fs";

/** The version of the `leeway` package (read from its package.json, beside src/ and dist/). */
export function leewayVersion(): string {
  try {
    const manifest = JSON.parse(readFileSync(new URL("../package.json", import.meta.url), "utf8")) as { version?: unknown };
    return typeof manifest.version === "string" ? manifest.version : "unknown";
  } catch {
    return "unknown";
  }
}
