import { ACTIONS, CAUSES, PHASES, type Action, type Cause } from "@leeway/policy";
import type { EventCause } from "./labels.js";
import type { Timeline } from "./timeline.js";

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

/**
 * The first decision of a run of consecutive decisions, outside the
 * commissioning phase, with the same response action and the same cause.
 */
export interface ActionEpisode {
  /** Position in the replayed stream (0-based). */
  position: number;
  action: Action;
  cause: Cause;
}

/** A response: an episode that makes a claim about the machine. */
export interface Response extends ActionEpisode {
  /** What the response claims happened. */
  claims: EventCause;
  /** For an `"await-confirmation"`: the position of the `"retrain"` that completed it, or null. */
  completedAt: number | null;
}

const COMMISSIONING = PHASES.indexOf("commissioning");
const IS_RESPONSE_ACTION = ACTIONS.map((a) => RESPONSE_ACTIONS.includes(a));

/** The action episodes of a timeline, in order (see {@link ActionEpisode}). */
export function findEpisodes(timeline: Timeline): ActionEpisode[] {
  const actions = timeline.actionCodes();
  const causes = timeline.causeCodes();
  const phases = timeline.phaseCodes();
  const out: ActionEpisode[] = [];
  let previousAction = -1;
  let previousCause = -1;
  for (let i = 0; i < timeline.length; i++) {
    const a = actions[i] as number;
    const c = causes[i] as number;
    const continuing = a === previousAction && c === previousCause;
    previousAction = a;
    previousCause = c;
    if (continuing || phases[i] === COMMISSIONING || !IS_RESPONSE_ACTION[a]) continue;
    out.push({ position: i, action: ACTIONS[a] as Action, cause: CAUSES[c] as Cause });
  }
  return out;
}

/**
 * The responses among the episodes: those that make a claim
 * ({@link responseClass}). A `"retrain"` that directly follows an
 * `"await-confirmation"` (no other response in between) completes it — the
 * operator confirmed the retrain that was asked for — and is not a response
 * of its own.
 */
export function findResponses(episodes: readonly ActionEpisode[]): Response[] {
  const out: Response[] = [];
  for (const e of episodes) {
    const claims = responseClass(e.action, e.cause);
    if (claims === null) continue;
    const last = out[out.length - 1];
    if (e.action === "retrain" && last !== undefined && last.action === "await-confirmation" && last.completedAt === null) {
      last.completedAt = e.position;
      continue;
    }
    out.push({ ...e, claims, completedAt: null });
  }
  return out;
}
