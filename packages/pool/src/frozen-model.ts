import { envelope, openSnapshot, type Snapshot } from "@leeway/core";
import { OselmAutoencoder, type OselmAutoencoderState } from "./oselm-autoencoder.js";

/** The plain state in a snapshot of {@link FrozenModel}. */
export interface FrozenModelState {
  label: string | null;
  model: Snapshot<OselmAutoencoderState>;
}

/**
 * A copy of an autoencoder that scores but never learns: the frozen reference
 * of the policy engine. Made by {@link FrozenModel.from} or the pool's `freeze`.
 * @example
 * const live = new OselmAutoencoder({ inputs: 2, hidden: 3, seed: 1 });
 * live.learn(Float64Array.of(0.5, 0.5));
 * const reference = FrozenModel.from(live, "commissioning");
 * reference.score(Float64Array.of(0.5, 0.5)) === live.score(Float64Array.of(0.5, 0.5)); // true
 */
export class FrozenModel {
  static readonly kind = "leeway.pool.frozen-model";
  static readonly version = 1;
  readonly #model: OselmAutoencoder;
  readonly #label: string | null;

  private constructor(model: OselmAutoencoder, label: string | null) {
    this.#model = model;
    this.#label = label;
  }

  /** A frozen, independent copy of `model` (later learning by `model` does not reach it). */
  static from(model: OselmAutoencoder, label: string | null = null): FrozenModel {
    return new FrozenModel(model.clone(), label);
  }

  /** n, the input length. */
  get inputs(): number {
    return this.#model.inputs;
  }
  /** L, the number of hidden units. */
  get hidden(): number {
    return this.#model.hidden;
  }
  /** The label given when it was frozen (an operating mode's name), or null. */
  get label(): string | null {
    return this.#label;
  }
  /** Rows the model had learnt when it was frozen. */
  get count(): number {
    return this.#model.count;
  }

  /** Mean squared reconstruction error of x, as {@link OselmAutoencoder.score}. */
  score(x: ArrayLike<number>): number {
    return this.#model.score(x);
  }

  /** The signed residual of the input scored last, as {@link OselmAutoencoder.residual}. */
  residual(out: Float64Array): Float64Array {
    return this.#model.residual(out);
  }

  /** Reconstruction of x in input units, as {@link OselmAutoencoder.reconstruct}. */
  reconstruct(x: ArrayLike<number>, out?: Float64Array): Float64Array {
    return this.#model.reconstruct(x, out);
  }

  /** Bytes of the frozen state (as {@link OselmAutoencoder.stateBytes}). */
  stateBytes(): number {
    return this.#model.stateBytes();
  }

  /** A learning copy of the frozen model, for example to start a new live model from a reference. */
  thaw(): OselmAutoencoder {
    return this.#model.clone();
  }

  /** The label and the model's snapshot. */
  snapshot(): Snapshot<FrozenModelState> {
    return envelope(FrozenModel.kind, FrozenModel.version, { label: this.#label, model: this.#model.snapshot() });
  }

  /** Rebuilds a frozen model from {@link snapshot}. */
  static restore(snapshot: unknown): FrozenModel {
    const s = openSnapshot(snapshot, FrozenModel.kind, FrozenModel.version);
    const label = s.stringOrNull("label");
    return new FrozenModel(OselmAutoencoder.restore(s.raw("model")), label);
  }
}
