import type { DecisionEngine } from "@leeway/policy";

/**
 * Tells an engine that its stream's site shifted as a whole: the current or
 * next change onset counts as concept drift (absorbed, no anomaly page); an
 * engine whose own degradation stands declines it (see
 * `DecisionEngine.reportSiteShift`). The one place the fleet calls it.
 */
export function reportSiteShift(engine: DecisionEngine): void {
  engine.reportSiteShift();
}
