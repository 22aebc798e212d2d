// Sub-channel shift of an instrument response by linear interpolation between neighbouring channels.
//
// The IRF is a histogram g[j] (unit sum). Shifted later by s = (m + f)·Δ (m whole channels, 0 ≤ f < 1):
//   g_s[k] = (1 − f)·g[k − m] + f·g[k − m − 1],      d g_s[k] / ds = (g[k − m − 1] − g[k − m]) / Δ
// (channels outside the histogram count as zero). Linear interpolation keeps the sum and is exact for a
// whole-channel shift; the slope is the right-hand derivative where f = 0 (common practice in
// reconvolution fitting; the shift is a nuisance parameter).

/** Fills `shifted` with the IRF moved later by `shiftNs` (linear interpolation) and `slopePerNs` with d(shifted)/d(shiftNs); O(channels). */
export function shiftIrf(
  irf: Float64Array,
  shiftNs: number,
  channelWidthNs: number,
  shifted: Float64Array,
  slopePerNs: Float64Array | undefined,
): void {
  const shiftChannels = shiftNs / channelWidthNs;
  const whole = Math.floor(shiftChannels);
  const fraction = shiftChannels - whole;
  const length = irf.length;
  const inverseWidth = 1 / channelWidthNs;
  for (let k = 0; k < length; k++) {
    const i0 = k - whole;
    const i1 = i0 - 1;
    const at = i0 >= 0 && i0 < length ? (irf[i0] as number) : 0;
    const before = i1 >= 0 && i1 < length ? (irf[i1] as number) : 0;
    shifted[k] = (1 - fraction) * at + fraction * before;
    if (slopePerNs !== undefined) slopePerNs[k] = (before - at) * inverseWidth;
  }
}
