import { describe, expect, it } from "vitest";
import { RandomSource } from "@leeway/core";
import { timeToLimit } from "@leeway/stats";
import { expectLeewayError } from "../support/errors.js";
import { simulatedCrossingCoverage } from "./time-to-limit.simulated.js";

describe("timeToLimit", () => {
  it("the @example", () => {
    const rising = Array.from({ length: 40 }, (_, i) => 2 + 0.05 * i + 0.02 * Math.sin(7 * i));
    const t = timeToLimit(rising, { limit: 5, step: 1 });
    expect(t.status === "estimated" ? [t.expected.toFixed(1), t.earliest.toFixed(1), t.latest.toFixed(1)] : t.status).toEqual(["21.0", "20.7", "21.3"]);
  });

  it("a noise-free line crosses where the line says, in units of step, rising or falling", () => {
    const up = Array.from({ length: 30 }, (_, i) => 1 + 0.25 * i + (i % 2) * 1e-9);
    const t = timeToLimit(up, { limit: 20, step: 60 });
    expect(t.status).toBe("estimated");
    if (t.status !== "estimated") return;
    // level at the last value 1 + 0.25·29 = 8.25; (20 − 8.25)/0.25 = 47 steps of 60
    expect(t.expected).toBeCloseTo(47 * 60, 4);
    expect(t.slope).toBeCloseTo(0.25 / 60, 9);
    expect(t.earliest).toBeLessThanOrEqual(t.expected);
    expect(t.latest).toBeGreaterThanOrEqual(t.expected);
    const down = timeToLimit(up.map((x) => -x), { limit: -20, step: 60, side: "below" });
    expect(down.status === "estimated" ? down.expected : Number.NaN).toBeCloseTo(47 * 60, 4);
  });

  it("says reached when the line is already past the limit", () => {
    const up = Array.from({ length: 30 }, (_, i) => 0.1 * i + 0.01 * Math.cos(i));
    const t = timeToLimit(up, { limit: 1 });
    expect(t.status).toBe("reached");
    expect(t.status === "reached" ? t.level : 0).toBeGreaterThan(1);
  });

  it("refuses, with a reason a person can read, a flat series, a rise then fall, a trend away from the limit, and too few values", () => {
    const rng = new RandomSource("refusals");
    const flat = Array.from({ length: 60 }, () => rng.normal(5, 1));
    const flatT = timeToLimit(flat, { limit: 10 });
    expect(flatT.status === "refused" ? flatT.reason : flatT.status).toBe("no-significant-trend");
    expect(flatT.status === "refused" ? flatT.detail : "").toMatch(/Mann-Kendall/);

    const hump = Array.from({ length: 80 }, (_, i) => (i < 60 ? 0.1 * i : 6 - 0.3 * (i - 60)) + rng.normal(0, 0.05));
    const humpT = timeToLimit(hump, { limit: 20 });
    expect(humpT.status === "refused" ? humpT.reason : humpT.status).toBe("not-monotone");

    const falling = Array.from({ length: 40 }, (_, i) => 10 - 0.1 * i + rng.normal(0, 0.1));
    const away = timeToLimit(falling, { limit: 12 });
    expect(away.status === "refused" ? away.reason : away.status).toBe("moving-away");
    expect(timeToLimit(falling, { limit: 12, side: "below" }).status).toBe("reached");

    const few = timeToLimit([1, 2, 3, 4, 5], { limit: 10 });
    expect(few.status === "refused" ? few.reason : few.status).toBe("too-few-values");
    expect(few.status === "refused" ? few.detail : "").toContain("at least 10");
  });

  it("a weak trend whose slope interval reaches 0 is refused rather than given an unbounded interval", () => {
    // significant by Mann–Kendall at α = 0.5, but the 50 % slope interval cannot bound a far limit
    const rng = new RandomSource("weak");
    let refusedOrBounded = 0;
    for (let k = 0; k < 50; k++) {
      const xs = Array.from({ length: 20 }, (_, i) => 0.01 * i + rng.normal());
      const t = timeToLimit(xs, { limit: 50, confidence: 0.5 });
      if (t.status === "refused" || (t.status === "estimated" && Number.isFinite(t.latest))) refusedOrBounded++;
    }
    expect(refusedOrBounded).toBe(50);
  });

  it("a 90 % interval covers the true crossing of a line plus normal noise in 85–95 % of 400 series (Fieller 1954 on Sen 1968, common practice, no source)", () => {
    const rng = new RandomSource("line-coverage");
    let covered = 0;
    let estimated = 0;
    for (let k = 0; k < 400; k++) {
      const xs = Array.from({ length: 40 }, (_, i) => 0.1 * i + rng.normal());
      const t = timeToLimit(xs, { limit: 12 });
      if (t.status !== "estimated") continue;
      estimated++;
      const truth = (12 - 0.1 * 39) / 0.1;
      if (t.earliest <= truth && truth <= t.latest) covered++;
    }
    expect(estimated).toBeGreaterThan(380);
    expect(covered / estimated).toBeGreaterThan(0.85);
    expect(covered / estimated).toBeLessThan(0.95);
  });

  it("on the simulator (PS-2 outer race wearing, excess band RMS), the 90 % interval covers the true crossing in 85–95 % of 150 seeded streams (the long run: bench/time-to-limit-coverage.bench.ts)", () => {
    const c = simulatedCrossingCoverage({ streams: 150, truthStreams: 40 });
    console.log(`simulated crossing coverage: ${c.covered}/${c.estimated} = ${c.coverage.toFixed(3)}, limit ${c.limit.toFixed(2)} mm/s², median error ${c.medianError.toFixed(2)} samples`);
    expect(c.estimated).toBe(150);
    expect(c.coverage).toBeGreaterThanOrEqual(0.85);
    expect(c.coverage).toBeLessThanOrEqual(0.95);
  });

  it("refuses bad options naming them", () => {
    expectLeewayError(() => timeToLimit([1, 2, 3], { limit: Number.NaN }), "E_OPTION", "limit");
    expectLeewayError(() => timeToLimit([1, 2, 3], { limit: 1, step: 0 }), "E_OPTION", "step", "0");
    expectLeewayError(() => timeToLimit([1, 2, 3], { limit: 1, confidence: 0 }), "E_OPTION", "confidence");
    expectLeewayError(() => timeToLimit([1, Infinity], { limit: 1 }), "E_NON_FINITE", "values[1]");
    expectLeewayError(() => timeToLimit([1, 2], undefined as never), "E_OPTION", "options");
    expectLeewayError(() => timeToLimit([1, 2], { limit: 1, side: "over" as never }), "E_OPTION", "side", "over");
  });
});
