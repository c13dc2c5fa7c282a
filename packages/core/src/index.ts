export { LeewayError, OptionError, NonFiniteError, DimensionError, SnapshotError, StateError, describeValue } from "./errors.js";
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
} from "./validate.js";
export type { RangeBounds, NonFinitePolicy } from "./validate.js";
export { envelope, openSnapshot, SnapshotReader, toPlainArray, checkedSize, MAX_SNAPSHOT_ELEMENTS } from "./snapshot.js";
export type { Snapshot } from "./snapshot.js";
export { RandomSource } from "./random.js";
export type { RandomSourceState } from "./random.js";
export type { Snapshotable, SampleCounts } from "./types.js";
