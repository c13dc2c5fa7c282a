import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { Framer } from "@leeway/signal";
import { expectLeewayError, throughJson } from "../support/errors.js";
import { expectRefusesCorruptions } from "../support/snapshot-corruption.js";

function allFrames(framer: Framer, xs: number[]): number[][] {
  const out: number[][] = [];
  for (const x of xs) {
    const f = framer.observe(x);
    if (f !== null) out.push(Array.from(f));
  }
  return out;
}

describe("Framer", () => {
  it("frame j holds samples [j·hop, j·hop + size), for overlapping, abutting and gapped hops", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 16 }), fc.integer({ min: 1, max: 40 }), fc.integer({ min: 0, max: 200 }), (size, hop, n) => {
        const xs = Array.from({ length: n }, (_, i) => i);
        const frames = allFrames(new Framer({ size, hop }), xs);
        const expected: number[][] = [];
        for (let start = 0; start + size <= n; start += hop) expected.push(xs.slice(start, start + size));
        expect(frames).toEqual(expected);
      }),
    );
  });

  it("overlap 0.5 gives hop size/2; observeMany reaches the same frames and state as observe", () => {
    expect(new Framer({ size: 1024, overlap: 0.5 }).hop).toBe(512);
    expect(new Framer({ size: 4, overlap: 0.99 }).hop).toBe(1);
    const xs = Float64Array.from({ length: 50 }, (_, i) => Math.sin(i));
    const a = new Framer({ size: 8, hop: 3 });
    const b = new Framer({ size: 8, hop: 3 });
    const fromMany: number[][] = [];
    const count = b.observeMany(xs, (frame, j) => {
      expect(j).toBe(fromMany.length);
      fromMany.push(Array.from(frame));
    });
    expect(fromMany).toEqual(allFrames(a, Array.from(xs)));
    expect(count).toBe(fromMany.length);
    expect(b.snapshot()).toEqual(a.snapshot());
  });

  it("snapshot/restore through JSON continues bit-identically at any point", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 12 }), fc.integer({ min: 1, max: 20 }), fc.integer({ min: 0, max: 60 }), (size, hop, cut) => {
        const xs = Array.from({ length: 100 }, (_, i) => Math.cos(i * 0.7));
        const a = new Framer({ size, hop });
        allFrames(a, xs.slice(0, cut));
        const b = Framer.restore(throughJson(a.snapshot()));
        expect(allFrames(b, xs.slice(cut))).toEqual(allFrames(a, xs.slice(cut)));
        expect(b.snapshot()).toEqual(a.snapshot());
      }),
    );
  });

  it("non-finite samples are refused, or skipped and counted", () => {
    expectLeewayError(() => new Framer({ size: 4 }).observe(Number.NaN), "E_NON_FINITE", "x");
    const f = new Framer({ size: 2, nonFinite: "skip" });
    expect(allFrames(f, [1, Number.NaN, 2, Number.POSITIVE_INFINITY, 3, 4])).toEqual([[1, 2], [3, 4]]);
    expect([f.count, f.skipped, f.frames]).toEqual([4, 2, 2]);
    expect(f.snapshot().state.skipped).toBe(2);
  });

  it("refuses bad options", () => {
    expectLeewayError(() => new Framer({ size: 0 }), "E_OPTION", "size");
    expectLeewayError(() => new Framer({ size: 4, hop: 0 }), "E_OPTION", "hop");
    expectLeewayError(() => new Framer({ size: 4, overlap: 1 }), "E_OPTION", "overlap");
    expectLeewayError(() => new Framer({ size: 4, hop: 2, overlap: 0.5 }), "E_OPTION", "overlap", "not both");
    expectLeewayError(() => new Framer({ size: 4, step: 2 } as never), "E_OPTION", "step");
    expectLeewayError(() => new Framer({ size: 4, nonFinite: "zero" as never }), "E_OPTION", "nonFinite");
  });

  it("refuses corrupted snapshots whole", () => {
    const mid = new Framer({ size: 6, hop: 4 });
    allFrames(mid, [1, 2, 3, 4, 5, 6, 7, 8, 9]);
    expectRefusesCorruptions((s) => Framer.restore(s), mid.snapshot(), { sizePaths: [["size"], ["hop"]] });
    const pending = new Framer({ size: 3, hop: 5 });
    allFrames(pending, [1, 2, 3]);
    expectRefusesCorruptions((s) => Framer.restore(s), pending.snapshot(), { sizePaths: [["size"], ["hop"]] });
    const gap = new Framer({ size: 2, hop: 5 });
    allFrames(gap, [1, 2, 3]);
    expectRefusesCorruptions((s) => Framer.restore(s), gap.snapshot(), { sizePaths: [["size"], ["hop"]] });
  });

  it("refuses a snapshot whose buffer, frames, discard or emitted flag disagree with what its count implies (a truncated buffer among them)", () => {
    const mid = new Framer({ size: 6, hop: 4 });
    allFrames(mid, [1, 2, 3, 4, 5, 6, 7, 8, 9]); // one frame out, [5..9] held
    const good = throughJson(mid.snapshot());
    expect(good.state.buffer).toEqual([5, 6, 7, 8, 9]);
    const damaged = [
      { field: "buffer", state: { ...good.state, buffer: [5, 6, 7, 8] } },
      { field: "buffer", state: { ...good.state, buffer: [] } },
      { field: "frames", state: { ...good.state, frames: 0 } },
      { field: "frames", state: { ...good.state, count: 5 } },
      { field: "emitted", state: { ...good.state, emitted: true, buffer: [5, 6, 7, 8, 9, 10] } },
    ];
    for (const d of damaged) expectLeewayError(() => Framer.restore({ ...good, state: d.state }), "E_SNAPSHOT", `state.${d.field}`);
    const gap = new Framer({ size: 2, hop: 5 });
    allFrames(gap, [1, 2, 3]); // one frame out, two of three gap samples still to drop
    const g = throughJson(gap.snapshot());
    expect(g.state.discard).toBe(2);
    expectLeewayError(() => Framer.restore({ ...g, state: { ...g.state, discard: 1 } }), "E_SNAPSHOT", "state.discard", "must be 2");
  });

  it("refuses non-numbers with E_SAMPLE, also under nonFinite: \"skip\", and changes nothing", () => {
    for (const nonFinite of ["refuse", "skip"] as const) {
      const framer = new Framer({ size: 3, nonFinite });
      framer.observe(1);
      const before = JSON.stringify(framer.snapshot());
      for (const bad of ["5", null, [7], true, undefined]) expectLeewayError(() => framer.observe(bad as never), "E_SAMPLE", "Framer: x must be a number");
      expectLeewayError(() => framer.observeMany([1, "2"] as never, () => undefined), "E_SAMPLE", "xs[1]");
      expect(JSON.stringify(framer.snapshot())).toBe(before);
    }
  });

  it("keeps -0 as 0, so a framer restored from JSON hands out the same frames bit for bit", () => {
    const framer = new Framer({ size: 2 });
    framer.observe(-0);
    const restored = Framer.restore(throughJson(framer.snapshot()));
    expect(Object.is(framer.observe(1)?.[0], 0)).toBe(true);
    expect(Object.is(restored.observe(1)?.[0], 0)).toBe(true);
  });
  it("the documented example: size 4, hop 2 gives [1, 2, 3, 4] then [3, 4, 5, 6]", () => {
    const framer = new Framer({ size: 4, hop: 2 });
    expect([1, 2, 3].map((x) => framer.observe(x))).toEqual([null, null, null]);
    expect(Array.from(framer.observe(4) ?? [])).toEqual([1, 2, 3, 4]);
    expect(framer.observe(5)).toBeNull();
    expect(Array.from(framer.observe(6) ?? [])).toEqual([3, 4, 5, 6]);
  });
});
