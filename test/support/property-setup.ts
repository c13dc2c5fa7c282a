import fc from "fast-check";
import { inject, vi } from "vitest";

// Runs before every test file: every fc.assert / fc.check starts from the
// run's seed (chosen once in property-seed.global.ts). When hunting, every
// property's number of runs is multiplied as well.
const settings = inject("propertySettings");
fc.configureGlobal({ seed: settings.seed });

if (settings.runsFactor !== 1) {
  const factor = settings.runsFactor;
  vi.doMock("fast-check", async (importOriginal) => {
    const real = await importOriginal<typeof import("fast-check")>();
    const scaled = <P extends { numRuns?: number } | undefined>(params: P): P =>
      ({ ...params, numRuns: (params?.numRuns ?? real.readConfigureGlobal().numRuns ?? 100) * factor }) as P;
    const assert: typeof real.assert = ((property: never, params?: { numRuns?: number }) => real.assert(property, scaled(params))) as typeof real.assert;
    const check: typeof real.check = ((property: never, params?: { numRuns?: number }) => real.check(property, scaled(params))) as typeof real.check;
    const withScaling = { ...real.default, assert, check };
    return { ...real, default: withScaling, assert, check };
  });
}
