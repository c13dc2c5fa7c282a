import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { expect, it } from "vitest";

/** The folder of the open datasets, `../shared/data/` relative to the project root. */
export const sharedDataDir = fileURLToPath(new URL("../../../shared/data/", import.meta.url));

/**
 * `it` for checks on an open dataset. Where the dataset's file is present it
 * is plain `it`; where it is absent (a user's fresh clone) each check is
 * replaced by one that says, in its title, which dataset is missing, and
 * asserts that it really is missing — so the run shows what was not checked,
 * and a dataset that is present can never be passed over.
 */
export function withDataset(dataset: string, file: string): (title: string, check: () => void | Promise<void>, timeout?: number) => void {
  if (existsSync(file)) return (title, check, timeout) => it(title, check, timeout);
  return (title) =>
    it(`${title} — not run: dataset ${dataset} is missing (${file})`, () => {
      expect(existsSync(file)).toBe(false);
    });
}
