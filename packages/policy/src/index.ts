export { ACTIONS, CAUSES, PHASES } from "./decision.js";
export type { Action, Cause, Phase, Evidence, Decision } from "./decision.js";
