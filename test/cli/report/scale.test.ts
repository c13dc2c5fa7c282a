import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { escapeXml, formatNumber, niceTicks, yScale } from "../../../packages/cli/src/report/scale.js";

describe("niceTicks", () => {
  it("steps of 1, 2 or 5 × 10^k cover the range (Heckbert 1990, worked case)", () => {
    expect(niceTicks(0, 9.3, 5)).toEqual([0, 2, 4, 6, 8, 10]);
  });
  it("the ticks cover [low, high] (up to rounding) with one step size of 1, 2 or 5 × 10^k", () => {
    fc.assert(
      fc.property(fc.double({ min: -1e6, max: 1e6, noNaN: true }), fc.double({ min: 1e-3, max: 1e6, noNaN: true }), (low, span) => {
        const t = niceTicks(low, low + span, 5);
        const slack = 1e-9 * (Math.abs(low) + span); // floating-point rounding of the steps
        expect(t[0]).toBeLessThanOrEqual(low + slack);
        expect(t[t.length - 1]).toBeGreaterThanOrEqual(low + span - slack);
        const step = (t[1] as number) - (t[0] as number);
        const mantissa = step / 10 ** Math.floor(Math.log10(step) + 1e-9);
        expect([1, 2, 5, 10].some((m) => Math.abs(mantissa - m) < 1e-6)).toBe(true);
      }),
    );
  });
});

describe("formatNumber", () => {
  it("prints counts plainly, large values with k/M, small ones with 3 significant digits", () => {
    expect(formatNumber(0)).toBe("0");
    expect(formatNumber(5000)).toBe("5000");
    expect(formatNumber(1710.4)).toBe("1710");
    expect(formatNumber(20700)).toBe("20.7k");
    expect(formatNumber(1_000_000)).toBe("1M");
    expect(formatNumber(0.07123)).toBe("0.0712");
    expect(formatNumber(2.5e-5)).toBe("2.5e-5");
  });
});

describe("yScale", () => {
  it("maps low to the bottom and high to the top; spans over a factor 30 of positive data go log", () => {
    const lin = yScale(0, 10, 10, 110);
    expect(lin.log).toBe(false);
    expect(lin.y(0)).toBeCloseTo(110);
    expect(lin.y(10)).toBeCloseTo(10);
    const log = yScale(0.01, 100, 10, 110);
    expect(log.log).toBe(true);
    expect(log.y(0.01)).toBeCloseTo(110);
    expect(log.y(100)).toBeCloseTo(10);
    expect(log.y(1)).toBeCloseTo(60);
  });
});

describe("escapeXml", () => {
  it("escapes the five XML specials", () => {
    expect(escapeXml(`<a href="x">'&'</a>`)).toBe("&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;");
  });
});
