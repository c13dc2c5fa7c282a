import { StateError } from "@leeway/core";
import type { DecisionEngine } from "@leeway/policy";

/**
 * Tells an engine that its stream's site shifted as a whole: the current or
 * next change onset counts as concept drift (absorbed, no anomaly page). The
 * one place the fleet calls the engine's site-shift operator method.
 */
export function reportSiteShift(engine: DecisionEngine): void {
  const method = (engine as unknown as { reportSiteShift?: () => void }).reportSiteShift;
  if (typeof method !== "function") throw new StateError("DecisionEngine", "this version of the engine has no reportSiteShift(); the site-shift event cannot be applied");
  method.call(engine);
}
