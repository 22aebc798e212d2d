// One exponential component of the reconvolution model with its derivatives, in a single pass over the
// channels: the recursion of exponential-convolution.ts (same constants, same operations, so the same
// values) fused with the accumulation into the model and the Jacobian columns in the photon
// parameterisation p = a·τ/Δ (reconvolution-model.ts). Only without earlier pulses: the periodic term
// needs S[n] of the whole histogram before any channel is final, so that case goes through
// convolveExponentialWithIrf and a second pass.
import { recursionCoefficients } from './exponential-convolution.js';
import { itemAt } from '../model/item-at.js';

/** Where one component's contributions go: the model and its Jacobian columns on the fit range (channelCount long). */
export interface ComponentColumns {
  /** Expected counts; the component's a·R is added. */
  readonly model: Float64Array;
  /** ∂m/∂τ at fixed photons, a·(∂R/∂τ − R/τ), in counts/ns (overwritten). */
  readonly perTauNs: Float64Array;
  /** ∂m/∂p = R·Δ/τ, counts per photon (overwritten). */
  readonly perPhoton: Float64Array;
  /** ∂m/∂shift in counts/ns; the component's a·∂R/∂shift is added. */
  readonly perShiftNs: Float64Array;
}

/**
 * Adds amplitude·R (R = exp(−t/τ) ⊗ shifted IRF, channel-integrated, per unit amplitude) to the model on
 * channels [firstChannel, firstChannel + channelCount) and writes the τ and photon columns and adds to the
 * shift column (see ComponentColumns); `irf` and `irfSlopePerNs` are the shifted IRF and its shift
 * derivative over at least the range end. O(firstChannel + channelCount).
 */
export function addComponentWithDerivatives(
  irf: Float64Array,
  irfSlopePerNs: Float64Array,
  tauNs: number,
  channelWidthNs: number,
  amplitude: number,
  firstChannel: number,
  channelCount: number,
  out: ComponentColumns,
): void {
  const { x, k0, c, dx, dk0, dc } = recursionCoefficients(tauNs, channelWidthNs);
  const { model, perTauNs, perPhoton, perShiftNs } = out;
  const inverseTau = 1 / tauNs;
  const photonScale = channelWidthNs / tauNs;
  let s = 0;
  let ds = 0;
  let ss = 0;
  // Before the range: only the recursions advance.
  for (let k = 0; k < firstChannel; k++) {
    ds = x * ds + dx * s;
    ss = x * ss + itemAt(irfSlopePerNs, k);
    s = x * s + itemAt(irf, k);
  }
  for (let index = 0; index < channelCount; index++) {
    const g = itemAt(irf, firstChannel + index);
    const h = itemAt(irfSlopePerNs, firstChannel + index);
    const response = g * k0 + c * s;
    const responsePerTau = g * dk0 + dc * s + c * ds;
    const responsePerShift = h * k0 + c * ss;
    model[index] = itemAt(model, index) + amplitude * response;
    perTauNs[index] = amplitude * (responsePerTau - response * inverseTau);
    perPhoton[index] = response * photonScale;
    perShiftNs[index] = itemAt(perShiftNs, index) + amplitude * responsePerShift;
    ds = x * ds + dx * s;
    ss = x * ss + h;
    s = x * s + g;
  }
}
