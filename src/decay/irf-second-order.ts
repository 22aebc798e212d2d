// IRF within channels to second order: the sub-channel shift by cubic (Catmull–Rom) interpolation of the
// channel-integrated IRF, and a correction for the flat-within-channel assumption of the convolution.
//
// The convolution recursion (exponential-convolution.ts) is exact for an IRF that is flat within each
// channel. For a smooth true IRF r(t) with channel integrals g[j], expanding both the data and the model
// to second order in the channel width Δ (midpoint rule) gives model − data = (Δ²/12)·(r'' ⊗ decay): the
// flat IRF acts as an extra blur of variance Δ²/6 (Δ²/12 from spreading g[j] evenly over its channel, as in
// Sheppard's correction, and Δ²/12 from integrating the decay kernel over the IRF channel). Subtracting
// (1/12) of the IRF's second difference, g[j] − (g[j+1] − 2g[j] + g[j−1])/12, cancels that term, so the
// remaining bias is O(Δ⁴) instead of O(Δ²) (Sheppard, Proc. London Math. Soc. 29, 353 (1898), for the
// grouping term; the rest is our derivation, checked by simulation in test/unit/decay/coarse-channels.test.ts).
//
// Linear interpolation for a sub-channel shift f·Δ blurs by a further f(1 − f)Δ² and has a kink in the
// shift at every whole channel. Catmull–Rom interpolation of the channel integrals (Keys, IEEE Trans.
// ASSP 29, 1153 (1981), a = −½) is third-order accurate, keeps the sum, and is continuous in value and
// slope across whole channels. Values below zero (overshoot at the IRF's foot) are set to zero.
import { itemAt } from '../model/item-at.js';

const ONE_TWELFTH = 1 / 12;

/**
 * Fills `shifted` (and `slopePerNs` = d/d(shiftNs)) with the IRF moved later by `shiftNs`, by Catmull–Rom
 * interpolation and the Δ²/12 flat-channel correction (see header), on channels [0, endChannel); negative values set to 0
 * unless `clampNegative` is false (the linear operator, for error propagation); O(endChannel).
 */
export function shiftIrfSecondOrder(
  irf: Float64Array,
  shiftNs: number,
  channelWidthNs: number,
  shifted: Float64Array,
  slopePerNs: Float64Array | undefined,
  endChannel: number = irf.length,
  clampNegative = true,
): void {
  const length = irf.length;
  const shiftChannels = Number.isFinite(shiftNs) ? shiftNs / channelWidthNs : 0;
  const whole = Math.floor(shiftChannels);
  const t = 1 - (shiftChannels - whole);
  const t2 = t * t;
  const t3 = t2 * t;
  // Catmull–Rom weights of P0..P3 at t and of their t derivatives.
  const w0 = 0.5 * (-t + 2 * t2 - t3);
  const w1 = 0.5 * (2 - 5 * t2 + 3 * t3);
  const w2 = 0.5 * (t + 4 * t2 - 3 * t3);
  const w3 = 0.5 * (-t2 + t3);
  const d0 = 0.5 * (-1 + 4 * t - 3 * t2);
  const d1 = 0.5 * (-10 * t + 9 * t2);
  const d2 = 0.5 * (1 + 8 * t - 9 * t2);
  const d3 = 0.5 * (-2 * t + 3 * t2);
  const inverseWidth = 1 / channelWidthNs;
  const at = (i: number): number => (i >= 0 && i < length ? itemAt(irf, i) : 0);
  // Interpolated value (and slope) at channel k, for k in [−1, endChannel].
  const value = (k: number): number => {
    const i = k - whole;
    return w0 * at(i - 2) + w1 * at(i - 1) + w2 * at(i) + w3 * at(i + 1);
  };
  const slopeAt = (k: number): number => {
    const i = k - whole;
    return -(d0 * at(i - 2) + d1 * at(i - 1) + d2 * at(i) + d3 * at(i + 1)) * inverseWidth;
  };
  let previous = value(-1);
  let current = value(0);
  let previousSlope = slopePerNs === undefined ? 0 : slopeAt(-1);
  let currentSlope = slopePerNs === undefined ? 0 : slopeAt(0);
  for (let k = 0; k < endChannel; k++) {
    const next = value(k + 1);
    const corrected = current - ONE_TWELFTH * (next - 2 * current + previous);
    const positive = corrected > 0 || !clampNegative;
    shifted[k] = positive ? corrected : 0;
    if (slopePerNs !== undefined) {
      const nextSlope = slopeAt(k + 1);
      slopePerNs[k] = positive ? currentSlope - ONE_TWELFTH * (nextSlope - 2 * currentSlope + previousSlope) : 0;
      previousSlope = currentSlope;
      currentSlope = nextSlope;
    }
    previous = current;
    current = next;
  }
}
