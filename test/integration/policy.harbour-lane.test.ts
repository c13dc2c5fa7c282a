import { describe, expect, it } from "vitest";
import { DecisionEngine, type Decision } from "@leeway/policy";
import { MachineSimulator, harbourLane } from "@leeway/sim";

// The worked timeline of docs/policy.md: a week at Harbour Lane, PS-2, one
// sample every 10 s, one engine per speed setting (the host routes each spectrum
// by the drive's setpoint), the defaults scaled to that rate. The operator
// acknowledges every alarm four samples after it is raised. When an engine asks
// whether a level that persisted after an anomaly alarm is the new normal, the
// operator looks at the skid four samples later: with a rag in the impeller
// (the simulator's fault) the answer is no (rejectRetrain), otherwise yes
// (confirmRetrain: the standby compressor has been installed).

const SCALE = 360; // samples per simulated hour
const OPTIONS = { inputs: 256, seed: 1, members: 3, hidden: 16, commissioning: 120, calibration: 120, settling: 90, settlingLimit: 360, trendBlock: 6, coolDown: 180, baselineHalfLife: 180, targetArl0: 2000, retrainHorizon: 8640 } as const;

describe("a week at Harbour Lane with one engine per speed setting", () => {
  it("retrains once per speed for the compressor after the operator confirms, reports the bearing defect as degradation, learns nothing of the clog", () => {
    const sim = new MachineSimulator(harbourLane({ scale: SCALE }));
    const engines = new Map<string, DecisionEngine>();
    const ackAt = new Map<string, number>();
    const answerAt = new Map<string, number>();
    const questions: { mode: string; hour: number; answer: "confirm" | "reject" }[] = [];
    const retrains: { mode: string; hour: number }[] = [];
    const degradation = new Map<string, { hour: number; severity: number; decision: Decision }>();
    let clogLearnt = 0;
    let clogAlarm: { hour: number; mode: string } | null = null;
    for (let s = sim.next(); s !== null; s = sim.next()) {
      const mode = s.truth.mode;
      let engine = engines.get(mode);
      if (engine === undefined) engines.set(mode, (engine = new DecisionEngine(OPTIONS)));
      const d = engine.observe(s.spectrum);
      const hour = s.index / SCALE;
      if (d.action === "retrain") retrains.push({ mode, hour });
      if (d.action === "alarm" && d.cause === "degradation" && !degradation.has(mode)) degradation.set(mode, { hour, severity: s.truth.severity, decision: d });
      if (s.truth.fault !== null) {
        if (d.action === "learn") clogLearnt++;
        if (d.action === "alarm" && clogAlarm === null) clogAlarm = { hour, mode };
      }
      if (d.action === "alarm") ackAt.set(mode, d.index + 4);
      if (ackAt.get(mode) === d.index) engine.acknowledge();
      if (d.action === "await-confirmation") answerAt.set(mode, d.index + 4);
      if (answerAt.get(mode) === d.index && engine.awaitingConfirmation) {
        const answer = s.truth.fault === null ? "confirm" : "reject";
        questions.push({ mode, hour, answer });
        if (answer === "confirm") engine.confirmRetrain();
        else engine.rejectRetrain();
      }
    }
    const fmt = (h: number): string => `day ${Math.floor(h / 24) + 1} ${String(Math.floor(h % 24)).padStart(2, "0")}:${String(Math.floor((h % 1) * 60)).padStart(2, "0")}`;
    console.log(
      `Harbour Lane: questions ${questions.map((q) => `${q.mode} ${fmt(q.hour)} ${q.answer}`).join(", ")}; retrains ${retrains.map((r) => `${r.mode} ${fmt(r.hour)}`).join(", ")}; first degradation alarms ${[...degradation].map(([m, v]) => `${m} ${fmt(v.hour)} (severity ${v.severity.toFixed(3)})`).join(", ")}; clog alarm ${clogAlarm === null ? "none" : `${clogAlarm.mode} ${fmt(clogAlarm.hour)}`}`,
    );
    // the compressor (hour 34): one retrain per speed, each after it and before the defect begins (hour 72),
    // each one asked for (the compressor's noise floor raised an anomaly alarm that persisted) and confirmed
    expect(retrains.map((r) => r.mode).sort()).toEqual(["high", "low", "mid"]);
    expect(questions.filter((q) => q.answer === "confirm").map((q) => q.mode).sort()).toEqual(["high", "low", "mid"]);
    for (const r of retrains) {
      expect(r.hour).toBeGreaterThan(34);
      expect(r.hour).toBeLessThan(72);
    }
    // the defect (from hour 72): degradation on every engine, the first while the severity is small
    expect([...degradation.keys()].sort()).toEqual(["high", "low", "mid"]);
    const first = Math.min(...[...degradation.values()].map((v) => v.hour));
    const earliest = [...degradation.values()].find((v) => v.hour === first);
    expect(earliest?.severity).toBeLessThan(0.05);
    for (const v of degradation.values()) expect(v.hour).toBeGreaterThan(72);
    // the clog (hour 134, one hour): an anomaly alarm, none of it learnt
    expect(clogAlarm?.hour).toBeLessThan(134.2);
    expect(clogLearnt).toBe(0);
  });
});
