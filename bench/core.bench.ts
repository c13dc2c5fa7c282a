import { it } from "vitest";
import { RandomSource } from "@leeway/core";
import { BenchReport, consume, nsPerOp, sumBaselineNs } from "./harness.js";

it("core: random source", () => {
  const xs = new RandomSource(1).fillUniform(new Float64Array(1 << 16));
  const baseline = sumBaselineNs(xs);
  const report = new BenchReport("core");
  const r = new RandomSource(2);
  report.add("RandomSource.next", nsPerOp(() => { let s = 0; for (let i = 0; i < 4096; i++) s += r.next(); consume(s); }, 4096), baseline);
  report.add("RandomSource.normal", nsPerOp(() => { let s = 0; for (let i = 0; i < 4096; i++) s += r.normal(); consume(s); }, 4096), baseline);
  report.write();
});
