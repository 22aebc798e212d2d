// Sub-channel shift of an instrument response by linear interpolation between neighbouring channels.
//
// The IRF is a histogram g[j] (unit sum). Shifted later by s = (m + f)·Δ (m whole channels, 0 ≤ f < 1):
//   g_s[k] = (1 − f)·g[k − m] + f·g[k − m − 1],      d g_s[k] / ds = (g[k − m − 1] − g[k − m]) / Δ
// (channels outside the histogram count as zero). Linear interpolation keeps the sum and is exact for a
// whole-channel shift; the slope is the right-hand derivative where f = 0 (common practice in
// reconvolution fitting; the shift is a nuisance parameter).
import { itemAt } from '../model/item-at.js';

/**
 * Fills `shifted` with the IRF moved later by `shiftNs` (linear interpolation) and `slopePerNs` with
 * d(shifted)/d(shiftNs), on channels [0, endChannel) (default: all); O(endChannel).
 */
export function shiftIrf(
  irf: Float64Array,
  shiftNs: number,
  channelWidthNs: number,
  shifted: Float64Array,
  slopePerNs: Float64Array | undefined,
  endChannel: number = irf.length,
): void {
  const shiftChannels = shiftNs / channelWidthNs;
  const whole = Math.floor(shiftChannels);
  const fraction = shiftChannels - whole;
  const length = irf.length;
  const inverseWidth = 1 / channelWidthNs;
  // Channels whose source channels k − m and k − m − 1 both lie inside the histogram need no bound checks;
  // a non-finite or huge shift takes the checked path everywhere.
  const simple = Math.abs(whole) <= length + endChannel;
  const interiorStart = simple ? Math.min(Math.max(whole + 1, 0), endChannel) : endChannel;
  const interiorEnd = simple ? Math.max(Math.min(whole + length, endChannel), interiorStart) : endChannel;
  for (let k = 0; k < interiorStart; k++) shiftChannel(irf, whole, fraction, inverseWidth, k, shifted, slopePerNs);
  const keep = 1 - fraction;
  const offset = simple ? whole | 0 : 0;
  // Each source channel is read once: this channel's `at` is the next channel's `before`.
  let before = interiorStart < interiorEnd ? itemAt(irf, interiorStart - offset - 1) : 0;
  if (slopePerNs === undefined) {
    for (let k = interiorStart; k < interiorEnd; k++) {
      const at = itemAt(irf, k - offset);
      shifted[k] = keep * at + fraction * before;
      before = at;
    }
  } else {
    for (let k = interiorStart; k < interiorEnd; k++) {
      const at = itemAt(irf, k - offset);
      shifted[k] = keep * at + fraction * before;
      slopePerNs[k] = (before - at) * inverseWidth;
      before = at;
    }
  }
  for (let k = interiorEnd; k < endChannel; k++)
    shiftChannel(irf, whole, fraction, inverseWidth, k, shifted, slopePerNs);
}

/** One channel of shiftIrf with the source channels checked against the histogram (outside counts as zero). */
function shiftChannel(
  irf: Float64Array,
  whole: number,
  fraction: number,
  inverseWidth: number,
  k: number,
  shifted: Float64Array,
  slopePerNs: Float64Array | undefined,
): void {
  const i0 = k - whole;
  const i1 = i0 - 1;
  const at = i0 >= 0 && i0 < irf.length ? itemAt(irf, i0) : 0;
  const before = i1 >= 0 && i1 < irf.length ? itemAt(irf, i1) : 0;
  shifted[k] = (1 - fraction) * at + fraction * before;
  if (slopePerNs !== undefined) slopePerNs[k] = (before - at) * inverseWidth;
}
