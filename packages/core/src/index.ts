export { LeewayError, OptionError, NonFiniteError, SampleError, DimensionError, SnapshotError, StateError, describeValue, typeOf } from "./errors.js";
export type { ErrorCode } from "./errors.js";
export {
  finiteNumber,
  positiveNumber,
  nonNegativeNumber,
  numberInRange,
  integerInRange,
  positiveInteger,
  nonNegativeInteger,
  oneOf,
  booleanOption,
  seedOption,
  finiteArray,
  optionsObject,
  nonFiniteOption,
  requireFinite,
  isNumber,
  requireNumber,
  requireNumbers,
  finiteSamples,
  sampleWithin,
} from "./validate.js";
export type { RangeBounds, NonFinitePolicy } from "./validate.js";
export { envelope, openSnapshot, SnapshotReader, toPlainArray, checkedSize, MAX_SNAPSHOT_ELEMENTS } from "./snapshot.js";
export type { Snapshot } from "./snapshot.js";
export { RandomSource } from "./random.js";
export type { RandomSourceState } from "./random.js";
export type { Snapshotable, SampleCounts } from "./types.js";
export { optionTable, OptionTable } from "./option-table.js";
export type { OptionRow, OptionRows, ResolvedOptions, ResolvedValue, OptionDescription, SpanContext } from "./option-table.js";
export { parseDuration, samplePeriodOption } from "./duration.js";
