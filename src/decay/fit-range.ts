// The channel range a fit uses: explicit (rangeNs) or automatic. With an IRF the range starts a margin
// before the IRF rise (first channel ≥ 1 % of its peak, minus max(5 channels, one FWHM)) so background and
// shift are seen; without an IRF (tail fit) it starts two channels after the decay peak. It ends at the
// last channel for ML (valid at zero counts, Laurence & Chromy 2010) and, for weighted least squares, at
// the last 16-channel window whose mean is ≥ 1 count (weights 1/n are meaningless below; common practice).
import { AnalysisFailed } from '../model/errors.js';
import type { Estimator } from './estimators.js';
import { firstChannelAbove, fullWidthHalfMaximumNs, peakChannel } from './irf-metrics.js';
import { itemAt } from '../model/item-at.js';

export interface ChannelRange {
  /** First channel (inclusive). */
  readonly firstChannel: number;
  /** End channel (exclusive). */
  readonly endChannel: number;
}

/** Fraction of the IRF peak that marks its rise (common practice). */
export const IRF_RISE_FRACTION = 0.01;
/** Channels after the decay peak where a tail fit starts by default. */
export const TAIL_START_OFFSET_CHANNELS = 2;

/** Channels whose start time lies in [startNs, endNs]; throws OUT_OF_RANGE when fewer than `minimumChannels`. */
export function channelsInRange(
  timeNs: Float64Array,
  channelWidthNs: number,
  rangeNs: readonly [number, number],
  minimumChannels: number,
): ChannelRange {
  const slack = 1e-6 * channelWidthNs;
  let first = 0;
  while (first < timeNs.length && itemAt(timeNs, first) < rangeNs[0] - slack) first++;
  let end = first;
  while (end < timeNs.length && itemAt(timeNs, end) <= rangeNs[1] + slack) end++;
  return checked({ firstChannel: first, endChannel: end }, minimumChannels, `rangeNs [${rangeNs[0]}, ${rangeNs[1]}]`);
}

/** Automatic fit range (see header); O(n). */
export function automaticRange(
  counts: Float64Array,
  irfCounts: Float64Array | undefined,
  channelWidthNs: number,
  estimator: Estimator,
  minimumChannels: number,
): ChannelRange {
  const n = counts.length;
  let first: number;
  if (irfCounts === undefined) {
    first = Math.min(n - 1, peakChannel(counts) + TAIL_START_OFFSET_CHANNELS);
  } else {
    const rise = firstChannelAbove(irfCounts, IRF_RISE_FRACTION);
    const marginChannels = Math.max(5, Math.ceil(fullWidthHalfMaximumNs(irfCounts, channelWidthNs) / channelWidthNs));
    first = Math.max(0, rise - marginChannels);
  }
  let end = n;
  if (estimator !== 'ml') {
    const window = 16;
    let sum = 0;
    for (let k = n - 1; k >= first; k--) {
      sum += itemAt(counts, k);
      if (k + window < n) sum -= itemAt(counts, k + window);
      const size = Math.min(window, n - k);
      if (size === window && sum / window >= 1) {
        end = Math.min(n, k + window);
        break;
      }
    }
  }
  return checked({ firstChannel: first, endChannel: end }, minimumChannels, 'the automatic range');
}

function checked(range: ChannelRange, minimumChannels: number, what: string): ChannelRange {
  const count = range.endChannel - range.firstChannel;
  if (count < minimumChannels) {
    throw new AnalysisFailed(
      'OUT_OF_RANGE',
      `${what} holds ${count} channels but the model needs at least ${minimumChannels}`,
      { hint: 'Widen the fit range or use fewer components.' },
    );
  }
  return range;
}
