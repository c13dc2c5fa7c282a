import { describe, expect, it } from "vitest";
import { TimelineCollector } from "../../packages/cli/src/report/timeline.js";
import { countsText, timelineText } from "../../packages/cli/src/summary.js";
import { handMadeDecisions } from "./hand-made.js";

describe("text summaries", () => {
  const c = new TimelineCollector();
  const ds = handMadeDecisions(2000);
  for (const d of ds) c.add(d);
  const t = c.result();

  it("the timeline lists the non-routine decision changes, one a line, and leaves out normal learning", () => {
    const text = timelineText(t, 50, (i) => `#${i}`);
    const lines = text.split("\n");
    const notable = t.transitions.filter((d) => !((d.action === "learn" || d.action === "hold") && (d.cause === "normal" || d.cause === "commissioning")));
    expect(lines.length).toBe(notable.length);
    expect(lines[0]).toContain(`#${notable[0]!.index}`);
    expect(text).toContain("retrain");
    expect(text).not.toMatch(/learn +normal/);
  });
  it("cuts the timeline at its limit and says how many more there are", () => {
    const text = timelineText(t, 2);
    expect(text.split("\n").length).toBe(3);
    expect(text).toMatch(/… \d+ more decision changes/);
  });
  it("counts decisions by action", () => {
    const learn = ds.filter((d) => d.action === "learn").length;
    expect(countsText(t)).toContain(`learn ${learn}`);
  });
});
