import { envelope, openSnapshot, type Snapshot } from "@leeway/core";
import type { Cause, Phase } from "./decision.js";

/** The plain state of a {@link SiteShiftNotice}. */
export interface SiteShiftNoticeState {
  /** Index of the last decided sample when the site shift was reported, or −1 (none since commissioning). */
  reportedAt: number;
  /** Change onsets (settling starts) from this index to `until` are the site's; −1 when the notice is spent, declined or expired. */
  from: number;
  until: number;
  /** What the report did (for the evidence), or null. */
  outcome: string | null;
  /** True until the decision after the report has carried it in its evidence. */
  unannounced: boolean;
}

/** Where the engine stands when a site shift is reported (read by {@link SiteShiftNotice.report}). */
export interface SiteShiftSituation {
  index: number;
  phase: Phase;
  /** Index at which the settling under way began, or −1. */
  settlingStart: number;
  latchCause: Cause | null;
  /** Index of the last anomaly alarm, or −1. */
  anomalyAlarmAt: number;
  /** A degradation warning or alarm of this machine stands. */
  degrading: boolean;
}

/** What the core must do after a report: nothing more, or clear its anomaly latch into settling. */
export type SiteShiftCourse = "noted" | "clear-latch";

/**
 * The operator-style news that a machine's whole site shifted (most of its
 * streams changed at once: a new noise floor in the room, a change of
 * process), so the machine's change is the environment's — concept drift to
 * absorb — rather than a fault of its own. The notice covers the change
 * under way (a settling span, or an anomaly latch raised within `window`
 * samples, which the core clears into settling) or else the next change
 * onset within `window` samples of the report. A covered change settles
 * instead of paging and, once settled, retrains (or switches to a known
 * mode) without asking. One notice covers one change.
 *
 * A machine whose own degradation warning or alarm stands is never covered:
 * the report is declined and the degradation stays a fault.
 * @example
 * const n = new SiteShiftNotice();
 * n.report({ index: 500, phase: "watching", settlingStart: -1, latchCause: null, anomalyAlarmAt: -1, degrading: false }, 120);
 * [n.covers(530), n.covers(700)]; // [true, false]
 */
export class SiteShiftNotice {
  static readonly kind = "leeway.policy.site-shift-notice";
  static readonly version = 1;
  #reportedAt = -1;
  #from = -1;
  #until = -1;
  #outcome: string | null = null;
  #unannounced = false;

  /** Index of the last decided sample at the latest report, or −1. */
  get reportedAt(): number {
    return this.#reportedAt;
  }

  /**
   * Takes a report at `situation`; `window` (samples) bounds how far the
   * covered change may lie from it. Returns "clear-latch" when the core must
   * clear its anomaly latch into settling.
   */
  report(situation: SiteShiftSituation, window: number): SiteShiftCourse {
    const { index, phase } = situation;
    this.#reportedAt = index;
    this.#unannounced = true;
    this.#from = -1;
    this.#until = -1;
    if (situation.degrading || situation.latchCause === "degradation") return this.#decline("declined: a degradation warning or alarm of this machine stands; it stays a fault");
    if (phase === "commissioning") return this.#decline("declined: commissioning learns every sample as normal already");
    if (phase === "latched" && situation.latchCause !== "anomaly") return this.#decline(`declined: a ${String(situation.latchCause)} alarm is latched`);
    if (phase === "latched" && index - situation.anomalyAlarmAt > window) return this.#decline(`declined: the latched anomaly began more than ${window} samples before the report`);
    this.#from = phase === "settling" ? situation.settlingStart : index;
    this.#until = index + window;
    if (phase === "latched") {
      this.#outcome = "the anomaly latch of this change cleared into settling: the site shifted";
      return "clear-latch";
    }
    this.#outcome = phase === "settling" ? "the settling under way is the site's change" : `the next change onset within ${window} samples is the site's`;
    return "noted";
  }

  #decline(outcome: string): SiteShiftCourse {
    this.#outcome = outcome;
    return "noted";
  }

  /** True when a change whose settling began at `start` is the site's. */
  covers(start: number): boolean {
    return this.#from >= 0 && start >= this.#from && start <= this.#until;
  }

  /** A settling step at `index` of the span begun at `start`: a covered span keeps its cover while it lasts. */
  follow(start: number, index: number): void {
    if (this.covers(start) && index > this.#until) this.#until = index;
  }

  /** True while a covered change still moving may settle on (up to `limit` samples after the report). */
  settlesOn(start: number, index: number, limit: number): boolean {
    return this.covers(start) && index - this.#reportedAt < limit;
  }

  /** The notice as evidence, with what it did at this decision. */
  evidence(outcome: string): { reportedAt: number; outcome: string } {
    return { reportedAt: this.#reportedAt, outcome };
  }

  /** The notice has served its change (a retrain or a switch began). */
  spend(): void {
    this.#from = -1;
    this.#until = -1;
  }

  /** The report's outcome, once, for the first decision after it; else null. */
  announce(): { reportedAt: number; outcome: string } | null {
    if (!this.#unannounced) return null;
    this.#unannounced = false;
    return this.evidence(this.#outcome as string);
  }

  /** A new commissioning: the notice is forgotten. */
  forget(): void {
    this.#reportedAt = -1;
    this.#from = -1;
    this.#until = -1;
    this.#outcome = null;
    this.#unannounced = false;
  }

  snapshot(): Snapshot<SiteShiftNoticeState> {
    return envelope(SiteShiftNotice.kind, SiteShiftNotice.version, { reportedAt: this.#reportedAt, from: this.#from, until: this.#until, outcome: this.#outcome, unannounced: this.#unannounced });
  }

  /** Rebuilds a notice; `index` is the core's last decided sample (nothing may lie after it but the window). */
  static restore(snapshot: unknown, index: number): SiteShiftNotice {
    const r = openSnapshot(snapshot, SiteShiftNotice.kind, SiteShiftNotice.version);
    const big = Number.MAX_SAFE_INTEGER;
    const reportedAt = r.integer("reportedAt", -1, Math.max(-1, index));
    const from = r.integer("from", -1, Math.max(-1, index));
    const until = r.integer("until", -1, big);
    const outcome = r.stringOrNull("outcome");
    const unannounced = r.boolean("unannounced");
    if ((from < 0) !== (until < 0)) r.fail("until", `must be −1 exactly when from is, got from ${from}, until ${until}`);
    if (from >= 0 && until < from) r.fail("until", `must be >= from = ${from}, got ${until}`);
    if (reportedAt < 0 && (from >= 0 || outcome !== null || unannounced)) r.fail("reportedAt", "must be set when a notice or its outcome is");
    if (unannounced && outcome === null) r.fail("outcome", "must be set while the report is unannounced");
    const n = new SiteShiftNotice();
    n.#reportedAt = reportedAt;
    n.#from = from;
    n.#until = until;
    n.#outcome = outcome;
    n.#unannounced = unannounced;
    return n;
  }
}
