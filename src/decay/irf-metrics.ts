// Shape measures of a histogram peak (the IRF or the decay): peak channel, full width at half maximum,
// and the first channel of the rise, used for default fit ranges and warnings.

/** Index of the largest value (first one on ties); O(n). */
export function peakChannel(values: ArrayLike<number>): number {
  let best = 0;
  for (let k = 1; k < values.length; k++) if ((values[k] as number) > (values[best] as number)) best = k;
  return best;
}

/** Full width at half maximum in ns, with linear interpolation of both half-maximum crossings; O(n). */
export function fullWidthHalfMaximumNs(values: ArrayLike<number>, channelWidthNs: number): number {
  const peak = peakChannel(values);
  const half = 0.5 * (values[peak] as number);
  let left = peak;
  while (left > 0 && (values[left - 1] as number) > half) left--;
  let right = peak;
  while (right < values.length - 1 && (values[right + 1] as number) > half) right++;
  let leftPosition = left;
  if (left > 0) {
    const below = values[left - 1] as number;
    const above = values[left] as number;
    leftPosition = left - 1 + (half - below) / (above - below);
  }
  let rightPosition = right;
  if (right < values.length - 1) {
    const above = values[right] as number;
    const below = values[right + 1] as number;
    rightPosition = right + (above - half) / (above - below);
  }
  return (rightPosition - leftPosition) * channelWidthNs;
}

/** First channel whose value reaches `fraction` of the peak value; O(n). */
export function firstChannelAbove(values: ArrayLike<number>, fraction: number): number {
  const threshold = fraction * (values[peakChannel(values)] as number);
  for (let k = 0; k < values.length; k++) if ((values[k] as number) >= threshold) return k;
  return 0;
}
