import type { Action, Cause, Decision, Phase } from "@leeway/policy";

/**
 * A hand-made decision timeline of n samples (invented, for exercising the
 * report and the readers without the engine): commissioning, watching, a
 * level shift at 40 % that settles and is retrained, a slow rise from 70 %
 * that ends in a latched degradation alarm, and a short anomaly burst at 55 %.
 * Scores follow a fixed formula, so a test can recompute any of them.
 */
export function handMadeDecisions(n: number): Decision[] {
  const out: Decision[] = [];
  for (let i = 0; i < n; i++) out.push(handMadeDecision(i, n));
  return out;
}

/** The score of sample i of {@link handMadeDecisions} (a deterministic wiggle around a level). */
export function handMadeScore(i: number, n: number): number {
  const f = i / n;
  const level = f < 0.4 ? 1 : 1.6;
  const rise = f > 0.7 ? 3 * (f - 0.7) : 0;
  const burst = f > 0.55 && f < 0.56 ? 40 : 0;
  return level + rise + burst + 0.1 * Math.sin(i * 0.37) + 0.05 * Math.sin(i * 2.1);
}

export function handMadeDecision(i: number, n: number): Decision {
  const f = i / n;
  const live = handMadeScore(i, n);
  let action: Action = "learn";
  let cause: Cause = "normal";
  let phase: Phase = "watching";
  if (f < 0.1) {
    cause = "commissioning";
    phase = "commissioning";
  } else if (f >= 0.4 && f < 0.45) {
    action = "hold";
    cause = "concept-drift";
    phase = "settling";
  } else if (f >= 0.45 && f < 0.452) {
    action = "retrain";
    cause = "concept-drift";
    phase = "retraining";
  } else if (f > 0.55 && f < 0.56) {
    action = f > 0.555 ? "alarm" : "hold";
    cause = "anomaly";
  } else if (f >= 0.85) {
    action = "alarm";
    cause = "degradation";
    phase = "latched";
  }
  const statistic = f < 0.4 ? Math.abs(Math.sin(i * 0.11)) * 2 : f < 0.45 ? 8 * (1 - (f - 0.4) / 0.05) : Math.abs(Math.sin(i * 0.07));
  return {
    index: i,
    action,
    cause,
    phase,
    evidence: {
      liveScore: live,
      referenceScores: f < 0.45 ? [live * 1.02] : [live * 1.3 + rise(f), live * 1.01],
      change: { test: "cusum", statistic, threshold: 5 },
      trend: { z: f > 0.7 ? 10 * (f - 0.7) : 0.3 * Math.sin(i * 0.01), pValue: f > 0.7 ? Math.max(0, 0.3 - (f - 0.7)) : 0.5 },
    },
  };
}

function rise(f: number): number {
  return f > 0.7 ? 2 * (f - 0.7) : 0;
}
