export { OselmAutoencoder, MAX_INPUTS, MAX_HIDDEN } from "./oselm-autoencoder.js";
export type { OselmAutoencoderOptions, OselmAutoencoderState, AutoencoderHealth } from "./oselm-autoencoder.js";
export type { Activation } from "./activation.js";
export type { Dtype } from "./vector.js";
export type { ScalingOption } from "./scaling.js";
export { AutoencoderPool, MAX_MEMBERS, MAX_SPAWN_PATIENCE } from "./autoencoder-pool.js";
export type { AutoencoderPoolOptions, AutoencoderPoolState, PoolScore, PoolLearnReading, MemberInfo } from "./autoencoder-pool.js";
export { FrozenModel } from "./frozen-model.js";
export type { FrozenModelState } from "./frozen-model.js";
