import type { Action, Cause } from "@leeway/policy";
import type { EventCause } from "./labels.js";

/** The actions that answer a change: a decision with one of these may be a response. */
export const RESPONSE_ACTIONS: readonly Action[] = ["alarm", "retrain", "switch-mode", "await-confirmation"];

/**
 * What a decision claims has happened, as one of the event causes, or null
 * when the decision is not a response at all.
 *
 * - `"retrain"` and `"switch-mode"` claim concept drift, whatever their cause
 *   field says (the engine adapts only to benign change).
 * - `"alarm"` and `"await-confirmation"` claim their cause: `"anomaly"`,
 *   `"degradation"` or `"concept-drift"`; `"known-mode"` counts as concept drift.
 *   With any other cause (`"normal"`, `"commissioning"`, `"operator"`) they
 *   make no claim about the machine and are not responses.
 * - `"learn"` and `"hold"` are never responses.
 * @example
 * responseClass("switch-mode", "known-mode"); // "concept-drift"
 * responseClass("alarm", "degradation");      // "degradation"
 * responseClass("hold", "anomaly");           // null
 */
export function responseClass(action: Action, cause: Cause): EventCause | null {
  switch (action) {
    case "retrain":
    case "switch-mode":
      return "concept-drift";
    case "alarm":
    case "await-confirmation":
      if (cause === "anomaly" || cause === "degradation" || cause === "concept-drift") return cause;
      if (cause === "known-mode") return "concept-drift";
      return null;
    default:
      return null;
  }
}
