// Shape measures of a histogram peak (the IRF or the decay): peak channel, full width at half maximum,
// and the first channel of the rise, used for default fit ranges and warnings.
import { itemAt } from '../model/item-at.js';

/** Index of the largest value (first one on ties); O(n). */
export function peakChannel(values: ArrayLike<number>): number {
  let best = 0;
  for (let k = 1; k < values.length; k++) if (itemAt(values, k) > itemAt(values, best)) best = k;
  return best;
}

/** Full width at half maximum in ns, with linear interpolation of both half-maximum crossings; O(n). */
export function fullWidthHalfMaximumNs(values: ArrayLike<number>, channelWidthNs: number): number {
  const peak = peakChannel(values);
  const half = 0.5 * itemAt(values, peak);
  let left = peak;
  while (left > 0 && itemAt(values, left - 1) > half) left--;
  let right = peak;
  while (right < values.length - 1 && itemAt(values, right + 1) > half) right++;
  let leftPosition = left;
  if (left > 0) {
    const below = itemAt(values, left - 1);
    const above = itemAt(values, left);
    leftPosition = left - 1 + (half - below) / (above - below);
  }
  let rightPosition = right;
  if (right < values.length - 1) {
    const above = itemAt(values, right);
    const below = itemAt(values, right + 1);
    rightPosition = right + (above - half) / (above - below);
  }
  return (rightPosition - leftPosition) * channelWidthNs;
}

/** First channel whose value reaches `fraction` of the peak value; O(n). */
export function firstChannelAbove(values: ArrayLike<number>, fraction: number): number {
  const threshold = fraction * itemAt(values, peakChannel(values));
  for (let k = 0; k < values.length; k++) if (itemAt(values, k) >= threshold) return k;
  return 0;
}
