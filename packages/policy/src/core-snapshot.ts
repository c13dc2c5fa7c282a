import { envelope, openSnapshot, type Snapshot, type SnapshotReader } from "@leeway/core";
import { CAUSES, PHASES, type Cause } from "./decision.js";
import { CORE_OPTION_NAMES, resolveCoreSettings, type CoreSettings } from "./options.js";
import type { ScoreLevel } from "./calibration.js";
import type { CoreLedger, CoreParts } from "./decision-core.js";
import { AnomalyEpisode } from "./anomaly-episode.js";
import { DegradationMonitor } from "./degradation-monitor.js";
import { ChangeWatch } from "./change-watch.js";
import { CalibrationSpan } from "./calibration-span.js";
import { RetrainGate } from "./retrain-gate.js";
import { Settling } from "./settling.js";
import { FeatureAttribution, signatureHalfLife } from "./feature-attribution.js";
import { SiteShiftNotice } from "./site-shift-notice.js";

/** Kind and version of a decision core's snapshot. */
export const CORE_KIND = "leeway.policy.decision-core";
/** Version 6 added the site-shift notice and one open event per cause, version 7 the sample period in the settings (and new states of the degradation monitor and the change watch); older versions are refused. */
export const CORE_VERSION = 7;

/** The plain state of a decision core: its settings, its ledger, and one snapshot per part. */
export interface CoreSnapshotState extends Omit<CoreLedger, "levels" | "liveLevel"> {
  settings: Record<string, unknown>;
  levels: { mean: number; spread: number }[];
  liveLevel: { mean: number; spread: number } | null;
  anomaly: Snapshot;
  degradation: Snapshot;
  change: Snapshot;
  calibration: Snapshot;
  gate: Snapshot;
  settling: Snapshot;
  attribution: Snapshot;
  siteShift: Snapshot;
}

/** The core's state as plain data (settings in table order, then the ledger, then the parts). */
export function writeCoreSnapshot(settings: CoreSettings, ledger: CoreLedger, parts: CoreParts): Snapshot<CoreSnapshotState> {
  const plainSettings: Record<string, unknown> = {};
  for (const key of CORE_OPTION_NAMES) plainSettings[key] = settings[key];
  plainSettings.samplePeriod = settings.samplePeriod;
  return envelope(CORE_KIND, CORE_VERSION, {
    settings: plainSettings,
    ...ledger,
    levels: ledger.levels.map((l) => ({ mean: l.mean, spread: l.spread })),
    liveLevel: ledger.liveLevel === null ? null : { mean: ledger.liveLevel.mean, spread: ledger.liveLevel.spread },
    anomaly: parts.anomaly.snapshot(),
    degradation: parts.degradation.snapshot(),
    change: parts.change.snapshot(),
    calibration: parts.calibration.snapshot(),
    gate: parts.gate.snapshot(),
    settling: parts.settling.snapshot(),
    attribution: parts.attribution.snapshot(),
    siteShift: parts.siteShift.snapshot(),
  });
}

/**
 * Reads a core's snapshot: settings through the option table, the ledger,
 * each part through its own restore, then the rules that tie them together
 * (a latch exactly in the latched phase, thresholds once commissioning is
 * over, a confirmation only while pending, settling after an anomaly only
 * while settling). Anything wrong is refused whole with SnapshotError.
 */
export function readCoreSnapshot(snapshot: unknown, component: string): { settings: CoreSettings; ledger: CoreLedger; parts: CoreParts } {
  const r: SnapshotReader = openSnapshot(snapshot, CORE_KIND, CORE_VERSION);
  const settingsReader = r.object("settings");
  const raw: Record<string, unknown> = {};
  for (const key of CORE_OPTION_NAMES) raw[key] = settingsReader.raw(key);
  const samplePeriod = settingsReader.numberOrNull("samplePeriod");
  if (samplePeriod !== null && !(samplePeriod > 0)) settingsReader.fail("samplePeriod", `must be a number of seconds > 0 or null, got ${samplePeriod}`);
  let settings: CoreSettings;
  try {
    // spans are stored in samples: the period only turns evidence into seconds
    settings = resolveCoreSettings(component, raw, samplePeriod);
  } catch (error) {
    r.fail("settings", `are not valid options: ${(error as Error).message}`);
  }
  const big = Number.MAX_SAFE_INTEGER;
  const index = r.integer("index", -1, big);
  const phase = r.oneOf("phase", PHASES);
  const latchCause = r.stringOrNull("latchCause");
  if (latchCause !== null && !CAUSES.includes(latchCause as Cause)) r.fail("latchCause", `must be a cause or null, got ${JSON.stringify(latchCause)}`);
  if ((phase === "latched") !== (latchCause !== null)) r.fail("latchCause", "must be set exactly when the phase is latched");
  const commissioningLength = r.integer("commissioningLength", 1, 2 ** 31 - 1);
  const newestId = r.integer("newestId", 0, 1_000_000);
  const ledger: CoreLedger = {
    index,
    skipped: r.integer("skipped", 0, big),
    phase,
    latchCause: latchCause as Cause | null,
    commissioningLength,
    commissioningLeft: r.integer("commissioningLeft", 0, commissioningLength),
    levels: r.objects("levels", { max: newestId + 1 }).map(readLevel),
    liveLevel: readLevelOrNull(r),
    activeId: r.integer("activeId", 0, newestId),
    newestId,
    retrains: r.integer("retrains", 0, big),
    switches: r.integer("switches", 0, big),
    alarms: r.integer("alarms", 0, big),
    anomalyAlarmAt: r.integer("anomalyAlarmAt", -1, Math.max(-1, index)),
    latchedAt: r.integer("latchedAt", -1, Math.max(-1, index)),
    latchNormalRun: r.integer("latchNormalRun", 0, big),
    openAnomaly: r.numberOrNull("openAnomaly"),
    openDegradation: r.numberOrNull("openDegradation"),
    alarmLevel: r.number("alarmLevel"),
  };
  const parts: CoreParts = {
    anomaly: AnomalyEpisode.restore(r.raw("anomaly"), settings.anomalyRun),
    degradation: DegradationMonitor.restore(r.raw("degradation"), settings),
    change: ChangeWatch.restore(r.raw("change"), settings),
    calibration: CalibrationSpan.restore(r.raw("calibration"), settings.calibration),
    gate: RetrainGate.restore(r.raw("gate"), settings),
    settling: Settling.restore(r.raw("settling"), settings.settling),
    attribution: FeatureAttribution.restore(r.raw("attribution"), signatureHalfLife(settings), newestId + 1),
    siteShift: SiteShiftNotice.restore(r.raw("siteShift"), index),
  };
  const purpose = parts.calibration.purpose;
  const calibrated = phase !== "commissioning" && purpose !== "commissioning";
  if (calibrated && (ledger.liveLevel === null || !parts.anomaly.calibrated || !parts.change.armed || ledger.levels[0] === undefined)) {
    r.fail("liveLevel", "and the thresholds must be set once commissioning is over");
  }
  if (calibrated && purpose === null && ledger.levels.length !== newestId + 1) r.fail("levels", `must have length ${newestId + 1}, got length ${ledger.levels.length}`);
  if (calibrated && purpose === null && parts.attribution.baselineCount !== newestId + 1) {
    r.fail("attribution", `must hold ${newestId + 1} baselines (one per reference), got ${parts.attribution.baselineCount}`);
  }
    if (parts.settling.afterAnomaly && phase !== "settling") r.fail("settling", `can follow an anomaly only while settling, the phase is "${phase}"`);
  return { settings, ledger, parts };
}

function readLevelOrNull(r: SnapshotReader): ScoreLevel | null {
  const live = r.objectOrNull("liveLevel");
  return live === null ? null : readLevel(live);
}

function readLevel(r: SnapshotReader): ScoreLevel {
  const mean = r.number("mean");
  const spread = r.number("spread");
  if (!(spread > 0)) r.fail("spread", `must be > 0, got ${spread}`);
  return { mean, spread };
}
