import type { Action, Cause, Decision, Phase } from "@leeway/policy";
import { Timeline } from "@leeway/eval";

/** A stretch [from, to) of hand-made decisions (to defaults to from + 1). */
export interface Mark {
  from: number;
  to?: number;
  action: Action;
  cause: Cause;
  phase?: Phase;
}

/**
 * n hand-made decisions: "learn"/"normal"/"watching" everywhere, overwritten by
 * the marks in order. The live score is 1 and the reference score 2 unless
 * `scores` gives a live score per sample (the reference is then live + 1).
 */
export function decisions(n: number, marks: readonly Mark[], scores?: readonly number[]): Decision[] {
  const out: Decision[] = [];
  for (let i = 0; i < n; i++) {
    const live = scores?.[i] ?? 1;
    out.push({ index: i, action: "learn", cause: "normal", phase: "watching", evidence: { liveScore: live, referenceScores: [live + 1] } });
  }
  for (const m of marks) {
    for (let i = m.from; i < (m.to ?? m.from + 1); i++) {
      const d = out[i] as Decision;
      d.action = m.action;
      d.cause = m.cause;
      d.phase = m.phase ?? d.phase;
    }
  }
  return out;
}

/** A timeline recording the given decisions. */
export function timelineOf(ds: readonly Decision[]): Timeline {
  const t = new Timeline();
  for (const d of ds) t.record(d);
  return t;
}
