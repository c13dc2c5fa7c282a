export { OselmAutoencoder, MAX_INPUTS, MAX_HIDDEN } from "./oselm-autoencoder.js";
export type { OselmAutoencoderOptions, OselmAutoencoderState, AutoencoderHealth } from "./oselm-autoencoder.js";
export type { Activation } from "./activation.js";
export type { Dtype } from "./vector.js";
export type { ScalingOption } from "./scaling.js";
