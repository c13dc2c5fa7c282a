export { Moments, MOMENTS_BLOCK } from "./moments.js";
export type { MomentsOptions, MomentsReading, MomentsState } from "./moments.js";
export { ksTwoSample, ksStatisticSorted, kolmogorovSurvival } from "./ks-two-sample.js";
export type { KsResult } from "./ks-two-sample.js";
