// Two-lifetime start values by exponential peeling (common practice for multi-exponential starts): a
// log-linear fit of the late tail gives the long lifetime; subtracting that exponential from the early
// decay and fitting the log of the remainder gives the short one. Weighted regression of ln(n − b) on t
// with weights n − b (≈ 1/var(ln n) for Poisson counts).
import { peakChannel } from './irf-metrics.js';
import { logLinearFit } from './log-linear-fit.js';
import { itemAt } from '../model/item-at.js';

/** [short, long] lifetimes in ns by peeling the background-subtracted decay on [first, end), or undefined when the data do not show two slopes. O(n). */
export function estimatePeeledLifetimesNs(
  timeNs: Float64Array,
  counts: Float64Array,
  background: number,
  firstChannel: number,
  endChannel: number,
): [number, number] | undefined {
  const peak = firstChannel + peakChannel(counts.subarray(firstChannel, endChannel));
  const peakExcess = itemAt(counts, peak) - background;
  if (!(peakExcess > 50)) return undefined;
  const lateTimes: number[] = [];
  const lateValues: number[] = [];
  let split = endChannel;
  for (let k = peak; k < endChannel; k++) {
    const excess = itemAt(counts, k) - background;
    if (split === endChannel && excess < 0.2 * peakExcess) split = k;
    if (k >= split && excess >= Math.max(0.01 * peakExcess, 5)) {
      lateTimes.push(itemAt(timeNs, k));
      lateValues.push(excess);
    }
  }
  const late = logLinearFit(lateTimes, lateValues, 4);
  if (late === undefined || !(late.slopePerNs < 0)) return undefined;
  const earlyTimes: number[] = [];
  const earlyValues: number[] = [];
  for (let k = peak; k < split; k++) {
    const t = itemAt(timeNs, k);
    const remainder = itemAt(counts, k) - background - Math.exp(late.intercept + late.slopePerNs * t);
    if (remainder >= Math.max(0.05 * peakExcess, 5)) {
      earlyTimes.push(t);
      earlyValues.push(remainder);
    }
  }
  const early = logLinearFit(earlyTimes, earlyValues, 4);
  if (early === undefined || !(early.slopePerNs < 0)) return undefined;
  const shortNs = -1 / early.slopePerNs;
  const longNs = -1 / late.slopePerNs;
  return shortNs < 0.8 * longNs ? [shortNs, longNs] : undefined;
}
