import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { CAUSES, PHASES, type Decision } from "@leeway/policy";
import { expectLeewayError } from "../../support/errors.js";
import { TimelineCollector } from "../../../packages/cli/src/report/timeline.js";
import { handMadeDecisions } from "../hand-made.js";

function decision(i: number, live: number, extra: Record<string, unknown> = {}): Decision {
  return { index: i, action: "learn", cause: "normal", phase: "watching", evidence: { liveScore: live, referenceScores: [2 * live], ...extra } };
}

describe("TimelineCollector", () => {
  it("every bucket's min and max equal the brute-force min and max of the samples it covers", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 1, maxLength: 700 }), fc.integer({ min: 64, max: 130 }), (xs, columns) => {
        const c = new TimelineCollector({ columns });
        xs.forEach((x, i) => c.add(decision(i, x)));
        const t = c.result();
        expect(t.buckets).toBeLessThanOrEqual(columns);
        expect(t.buckets).toBe(Math.ceil(xs.length / t.bucketWidth));
        const live = t.series.find((s) => s.key === "liveScore")!;
        for (let b = 0; b < t.buckets; b++) {
          const part = xs.slice(b * t.bucketWidth, (b + 1) * t.bucketWidth);
          expect(live.min[b]).toBe(Math.min(...part));
          expect(live.max[b]).toBe(Math.max(...part));
        }
      }),
      { numRuns: 60 },
    );
  });

  it("a stream of any length ends in between columns/2 and columns buckets of a power-of-two width", () => {
    const c = new TimelineCollector({ columns: 100 });
    for (let i = 0; i < 12345; i++) c.add(decision(i, i % 7));
    expect(c.bucketCount).toBeGreaterThan(50);
    expect(c.bucketCount).toBeLessThanOrEqual(100);
    expect(Math.log2(c.bucketWidth) % 1).toBe(0);
    expect(c.count).toBe(12345);
  });

  it("bucket masks are the union of the phases and causes of their samples", () => {
    const ds = handMadeDecisions(5000);
    const c = new TimelineCollector({ columns: 64 });
    for (const d of ds) c.add(d);
    const t = c.result();
    for (let b = 0; b < t.buckets; b++) {
      const part = ds.slice(b * t.bucketWidth, (b + 1) * t.bucketWidth);
      let phases = 0;
      let causes = 0;
      for (const d of part) {
        phases |= 1 << PHASES.indexOf(d.phase);
        causes |= 1 << CAUSES.indexOf(d.cause);
      }
      expect(t.phaseMask[b]).toBe(phases);
      expect(t.causeMask[b]).toBe(causes);
    }
  });

  it("traces nested numeric evidence as dotted keys, and counts decisions by action and cause", () => {
    const c = new TimelineCollector();
    for (const d of handMadeDecisions(1000)) c.add(d);
    const t = c.result();
    const keys = t.series.map((s) => s.key);
    expect(keys).toEqual(expect.arrayContaining(["liveScore", "referenceScores.0", "referenceScores.1", "change.statistic", "change.threshold", "trend.z", "trend.pValue"]));
    const total = t.counts.reduce((a, b) => a + b.count, 0);
    expect(total).toBe(1000);
    const alarms = handMadeDecisions(1000).filter((d) => d.action === "alarm" && d.cause === "degradation").length;
    expect(t.counts.find((x) => x.action === "alarm" && x.cause === "degradation")?.count).toBe(alarms);
  });

  it("keeps the decisions where action, cause or phase changed, up to its limit, and counts the rest", () => {
    const ds = handMadeDecisions(2000);
    const changes = ds.filter((d, i) => i === 0 || d.action !== ds[i - 1]!.action || d.cause !== ds[i - 1]!.cause || d.phase !== ds[i - 1]!.phase);
    const c = new TimelineCollector({ transitions: 3 });
    for (const d of ds) c.add(d, `t${d.index}`);
    const t = c.result();
    expect(t.transitions.map((x) => x.index)).toEqual(changes.slice(0, 3).map((d) => d.index));
    expect(t.transitions[1]?.time).toBe(`t${changes[1]!.index}`);
    expect(t.transitionsOmitted).toBe(changes.length - 3);
  });

  it("refuses bad options with E_OPTION naming the option", () => {
    expectLeewayError(() => new TimelineCollector({ columns: 10 }), "E_OPTION", "columns", "[64, 8192]");
    expectLeewayError(() => new TimelineCollector({ colums: 100 } as never), "E_OPTION", "colums");
  });

  it("ignores non-finite evidence numbers instead of drawing them", () => {
    const c = new TimelineCollector();
    c.add(decision(0, NaN));
    c.add(decision(1, 3));
    const live = c.result().series.find((s) => s.key === "liveScore")!;
    expect([live.min[0], live.max[0], live.min[1]]).toEqual([Infinity, -Infinity, 3]);
  });
});
