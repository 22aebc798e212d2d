// An IRF recorded as its own histogram (issue 15.7) has its own time axis: a channel width and a start
// time that may differ from the decay's. It is brought onto the decay's channels by overlap rebinning:
// the IRF is taken as constant within each of its channels (the same assumption as the reconvolution
// model) and each decay channel receives the IRF counts of the time it overlaps. This conserves counts,
// is exact for channel-integrated data when the IRF channels nest in the decay's, and equals linear
// interpolation for a fractional offset at equal widths. An IRF coarser than the decay cannot be refined
// without inventing shape, and an IRF whose counts fall largely outside the decay's window cannot be
// paired: both are refused with IRF_AXIS_MISMATCH and a hint.
import { InputRejected } from '../model/errors.js';
import { itemAt } from '../model/item-at.js';

/** Relative tolerance on channel widths treated as equal (0.1 %). */
export const CHANNEL_WIDTH_TOLERANCE = 1e-3;
/** Largest fraction of the IRF counts allowed to fall outside the decay's window after alignment (1 %). */
export const IRF_OUTSIDE_WINDOW_FRACTION = 0.01;

export interface HistogramAxis {
  /** Start time of each channel in ns (uniform). */
  readonly timeNs: ArrayLike<number>;
  readonly channelWidthNs: number;
}

export interface AlignedIrf {
  /** IRF counts on the decay's channels. */
  readonly counts: Float64Array;
  /** One sentence saying what was done (resampled, offset applied), or undefined when the axes were the same. */
  readonly note: string | undefined;
}

/**
 * IRF counts on the decay's channels by overlap rebinning on absolute time (see header); O(n + m).
 * Throws InputRejected IRF_AXIS_MISMATCH when the IRF is coarser than the decay or > 1 % of its counts
 * fall outside the decay's window.
 */
export function alignIrfToDecay(
  irf: HistogramAxis & { readonly counts: ArrayLike<number> },
  decay: HistogramAxis,
): AlignedIrf {
  const decayWidth = decay.channelWidthNs;
  const irfWidth = irf.channelWidthNs;
  const channels = decay.timeNs.length;
  const decayStart = decay.timeNs[0] ?? 0;
  const irfStart = irf.timeNs[0] ?? 0;
  const sameWidth = Math.abs(irfWidth - decayWidth) <= CHANNEL_WIDTH_TOLERANCE * decayWidth;
  const offsetNs = irfStart - decayStart;
  if (!sameWidth && irfWidth > decayWidth) {
    throw new InputRejected(
      'IRF_AXIS_MISMATCH',
      `the IRF has channels of ${irfWidth.toPrecision(4)} ns, coarser than the decay's ${decayWidth.toPrecision(4)} ns; it cannot be refined without inventing its shape`,
    );
  }
  const sameAxis =
    sameWidth && Math.abs(offsetNs) <= CHANNEL_WIDTH_TOLERANCE * decayWidth && irf.counts.length === channels;
  if (sameAxis) return { counts: Float64Array.from(irf.counts), note: undefined };
  const counts = new Float64Array(channels);
  let total = 0;
  let inside = 0;
  const windowEnd = decayStart + channels * decayWidth;
  for (let k = 0; k < irf.counts.length; k++) {
    const value = itemAt(irf.counts, k);
    total += value;
    if (value === 0) continue;
    const from = irfStart + k * irfWidth;
    const to = from + irfWidth;
    const low = Math.max(from, decayStart);
    const high = Math.min(to, windowEnd);
    if (high <= low) continue;
    const density = value / irfWidth;
    let channel = Math.max(0, Math.floor((low - decayStart) / decayWidth));
    while (channel < channels) {
      const channelFrom = decayStart + channel * decayWidth;
      const channelTo = channelFrom + decayWidth;
      if (channelFrom >= high) break;
      const overlap = Math.min(high, channelTo) - Math.max(low, channelFrom);
      if (overlap > 0) {
        counts[channel] = itemAt(counts, channel) + density * overlap;
        inside += density * overlap;
      }
      channel++;
    }
  }
  if (!(total > 0) || total - inside > IRF_OUTSIDE_WINDOW_FRACTION * total) {
    const outside = total > 0 ? (100 * (total - inside)) / total : 100;
    throw new InputRejected(
      'IRF_AXIS_MISMATCH',
      `${outside.toPrecision(3)} % of the IRF counts lie outside the decay's window (${decayStart.toPrecision(4)}–${windowEnd.toPrecision(4)} ns) once its own axis (starting at ${irfStart.toPrecision(4)} ns) is used`,
    );
  }
  const parts: string[] = [];
  if (!sameWidth)
    parts.push(`resampled from ${irfWidth.toPrecision(4)} ns to the decay's ${decayWidth.toPrecision(4)} ns channels`);
  if (Math.abs(offsetNs) > CHANNEL_WIDTH_TOLERANCE * decayWidth)
    parts.push(`placed by its own time axis (starting ${offsetNs.toPrecision(4)} ns from the decay's)`);
  if (parts.length === 0) parts.push(`placed on the decay's ${channels} channels from its own ${irf.counts.length}`);
  return { counts, note: `the IRF was ${parts.join(' and ')}` };
}
