// The interface every decay model implements: expected counts on the fit range and their derivatives
// with respect to the local parameters [τ1..τc, p1..pc, shiftNs, background, scatter] (pᵢ = component photons aᵢτᵢ/Δ).

/** A decay model on a fixed channel range; evaluation writes into caller-owned buffers (no allocation). */
export interface DatasetModel {
  /** Number of channels in the fit range. */
  readonly channelCount: number;
  /** Number of exponential components c. */
  readonly components: number;
  /**
   * Writes the expected counts per channel into `model` and, when `withDerivatives`, the derivative with
   * respect to local parameter j into `jacobian[j·channelCount …]` (column-major).
   */
  evaluate(local: Float64Array, withDerivatives: boolean, model: Float64Array, jacobian: Float64Array): void;
}
