export { bearingOrders, validateBearing, PS2_DRIVE_END_BEARING } from "./bearing.js";
export type { BearingGeometry, BearingOrders } from "./bearing.js";
export { defineScenario, PS2_MACHINE, MAX_SCENARIO_LENGTH, MAX_SCENARIO_LEVEL } from "./scenario.js";
export type {
  Scenario,
  ScenarioSpec,
  ScenarioEvent,
  EventSpec,
  MachineSpec,
  ModeSegment,
  InterferenceTone,
  EnvironmentShiftEvent,
  DegradationEvent,
  FaultEvent,
  DefectSite,
  FaultKind,
} from "./scenario.js";
export { truthEvents } from "./truth.js";
export { shiftFraction } from "./shift-fraction.js";
export type { SampleTruth, TruthEvent } from "./truth.js";
export { MachineSimulator, degradationSeverity } from "./machine-simulator.js";
export type { SimulatedSpectrum, SimulatedFrame, MachineSimulatorState } from "./machine-simulator.js";
export { stationaryNull, conceptDrift, slowDegradation, driftThenDegradation, recurringModes, abruptFault, SUITE_DEFAULT_LENGTH, SPEEDS } from "./suite-presets.js";
export type { SuitePresetOptions } from "./suite-presets.js";
export { harbourLane, HARBOUR_LANE_DAYS, HARBOUR_LANE_DAY } from "./harbour-lane.js";
export type { HarbourLaneOptions } from "./harbour-lane.js";
export { collect } from "./collect.js";
export type { CollectedStream } from "./collect.js";
