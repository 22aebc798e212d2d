// Exact channel-integrated convolution of an exponential decay with a histogram IRF, by recursion.
//
// Channel k covers [kΔ, (k+1)Δ). With a piecewise-constant IRF (g[j]/Δ per ns on channel j, Σg = 1) and
// the decay exp(−t/τ), the expected fraction in channel k is (1/Δ)·Σ_{j≤k} g[j]·K[k−j] with, for
// x = exp(−Δ/τ), q = 1 − x (derived by integrating the double integral over both channels):
//   K[0] = τ − (τ²/Δ)·q,      K[m ≥ 1] = c·x^(m−1),  c = (τ²/Δ)·q².
// Hence F[k] = g[k]·K[0] + c·S[k] with S[k+1] = x·S[k] + g[k], S[0] = 0: O(channels), no approximation
// beyond the piecewise-constant IRF. The τ derivative follows the same recursion:
//   dS[k+1] = x·dS[k] + (dx/dτ)·S[k],  dx/dτ = x·Δ/τ²,  dK[0]/dτ = 1 + x − 2q·τ/Δ,  dc/dτ = (2τq/Δ)(q − xΔ/τ).
//
// Periodic excitation with period T ≥ nΔ (n channels): earlier pulses p = 1, 2, … add
//   Σ_p Σ_j g[j]·c·x^(k−j−1)·y^p = c·S[n]·x^(T/Δ − n + k) / (1 − y),  y = exp(−T/τ),
// the geometric series Σ_{p≥1} y^p = y/(1 − y) folded into the non-negative exponent T/Δ − n + k.
import { itemAt } from '../model/item-at.js';

/** Outputs of one component's convolution on the output channels [firstChannel, endChannel). */
export interface ConvolutionBuffers {
  /** Expected counts per channel per unit amplitude (amplitude = counts per channel at t = 0 for τ ≫ Δ). */
  readonly response: Float64Array;
  /** d(response)/dτ in 1/ns; filled only when `withDerivatives`. */
  readonly responsePerTauNs: Float64Array;
  /** d(response)/d(shiftNs) in 1/ns; filled only when an IRF slope is given. */
  readonly responsePerShiftNs: Float64Array;
}

/** Per-channel constants of the recursion for one τ (see header), each already divided by Δ where the response needs it. */
export interface RecursionCoefficients {
  /** x = exp(−Δ/τ), the factor of S[k] per channel. */
  readonly x: number;
  /** K[0]/Δ: weight of the same IRF channel. */
  readonly k0: number;
  /** c/Δ: weight of S[k]. */
  readonly c: number;
  /** dx/dτ in 1/ns. */
  readonly dx: number;
  /** d(K[0]/Δ)/dτ in 1/ns. */
  readonly dk0: number;
  /** d(c/Δ)/dτ in 1/ns. */
  readonly dc: number;
}

/** The recursion constants x, K[0]/Δ, c/Δ and their τ derivatives for lifetime `tauNs` and channel width `channelWidthNs`. */
export function recursionCoefficients(tauNs: number, channelWidthNs: number): RecursionCoefficients {
  const u = channelWidthNs / tauNs;
  const x = Math.exp(-u);
  const q = -Math.expm1(-u);
  const inverseWidth = 1 / channelWidthNs;
  return {
    x,
    k0: (tauNs - ((tauNs * tauNs) / channelWidthNs) * q) * inverseWidth,
    c: ((tauNs * tauNs * q * q) / channelWidthNs) * inverseWidth,
    dx: (x * u) / tauNs,
    dk0: (1 + x - (2 * q) / u) * inverseWidth,
    dc: ((2 * tauNs * q) / channelWidthNs) * (q - x * u) * inverseWidth,
  };
}

/** Convolves exp(−t/τ) with a unit-sum histogram IRF, channel-integrated, exact recursion (see header); O(channels). */
export function convolveExponentialWithIrf(
  irf: Float64Array,
  irfSlopePerNs: Float64Array | undefined,
  tauNs: number,
  channelWidthNs: number,
  periodNs: number | undefined,
  firstChannel: number,
  endChannel: number,
  withDerivatives: boolean,
  out: ConvolutionBuffers,
): void {
  const u = channelWidthNs / tauNs;
  const { x, k0, c, dx, dk0, dc } = recursionCoefficients(tauNs, channelWidthNs);
  const response = out.response;
  const perTau = out.responsePerTauNs;
  const perShift = out.responsePerShiftNs;
  const withShift = irfSlopePerNs !== undefined;
  const channels = irf.length;
  let s = 0;
  let ds = 0;
  let ss = 0;
  const rangeStop = Math.min(endChannel, channels);
  // Before the range: only the recursions advance.
  for (let k = 0; k < firstChannel; k++) {
    if (withDerivatives) {
      ds = x * ds + dx * s;
      if (withShift) ss = x * ss + itemAt(irfSlopePerNs, k);
    }
    s = x * s + itemAt(irf, k);
  }
  if (!withDerivatives) {
    for (let k = firstChannel; k < rangeStop; k++) {
      const g = itemAt(irf, k);
      response[k - firstChannel] = g * k0 + c * s;
      s = x * s + g;
    }
  } else if (withShift) {
    for (let k = firstChannel; k < rangeStop; k++) {
      const g = itemAt(irf, k);
      const h = itemAt(irfSlopePerNs, k);
      const index = k - firstChannel;
      response[index] = g * k0 + c * s;
      perTau[index] = g * dk0 + dc * s + c * ds;
      perShift[index] = h * k0 + c * ss;
      ds = x * ds + dx * s;
      ss = x * ss + h;
      s = x * s + g;
    }
  } else {
    for (let k = firstChannel; k < rangeStop; k++) {
      const g = itemAt(irf, k);
      const index = k - firstChannel;
      response[index] = g * k0 + c * s;
      perTau[index] = g * dk0 + dc * s + c * ds;
      ds = x * ds + dx * s;
      s = x * s + g;
    }
  }
  // With periodic excitation the sums run over the whole histogram (S[n]).
  if (periodNs !== undefined) {
    for (let k = rangeStop; k < channels; k++) {
      if (withDerivatives) {
        ds = x * ds + dx * s;
        if (withShift) ss = x * ss + itemAt(irfSlopePerNs, k);
      }
      s = x * s + itemAt(irf, k);
    }
  }
  if (periodNs === undefined) return;
  const y = Math.exp(-periodNs / tauNs);
  const folded = 1 / (1 - y);
  const dFolded = ((y * periodNs) / (tauNs * tauNs)) * folded * folded;
  const offsetChannels = periodNs / channelWidthNs - channels;
  let power = Math.exp(-(offsetChannels + firstChannel) * u);
  for (let k = firstChannel; k < endChannel; k++) {
    const index = k - firstChannel;
    const wrapped = c * s * power;
    response[index] = itemAt(response, index) + wrapped * folded;
    if (withDerivatives) {
      const exponentPerTau = ((offsetChannels + k) * u) / tauNs;
      const dWrapped = (dc * s + c * ds) * power + wrapped * exponentPerTau;
      perTau[index] = itemAt(perTau, index) + dWrapped * folded + wrapped * dFolded;
      if (withShift) perShift[index] = itemAt(perShift, index) + c * ss * power * folded;
    }
    power *= x;
  }
}
