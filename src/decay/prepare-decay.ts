// Turns a Decay and resolved options into what a fit needs: counts (Coates-corrected when asked), the
// unit-sum IRF or none (tail fit), the excitation period, the fit range, and the data warnings that do
// not depend on the fit (pile-up rate, low peak counts).
import type { Decay } from '../model/decay.js';
import { totalCounts } from '../model/decay.js';
import { InputRejected } from '../model/errors.js';
import { automaticRange, channelsInRange, type ChannelRange, IRF_RISE_FRACTION } from './fit-range.js';
import { firstChannelAbove, fullWidthHalfMaximumNs } from './irf-metrics.js';
import type { ResolvedFitDecayOptions } from './options.js';
import type { IrfWithinChannel } from './reconvolution-model.js';
import { coatesCorrection, PILE_UP_RATE_FRACTION } from './pile-up.js';
import { itemAt } from '../model/item-at.js';

export interface PreparedDecay {
  readonly timeNs: Float64Array;
  readonly channelWidthNs: number;
  /** Counts of the whole histogram as fitted (after the pile-up correction when applied). */
  readonly counts: Float64Array;
  /** IRF normalised to unit sum, or undefined for a tail fit. */
  readonly irfUnit: Float64Array | undefined;
  readonly irfFwhmNs: number | undefined;
  /** First channel of the IRF rise (≥ 1 % of its peak). */
  readonly irfRiseChannel: number | undefined;
  /** Excitation period in ns when the repetition rate is known and the period spans the histogram (earlier pulses modelled). */
  readonly periodNs: number | undefined;
  /** Repetition rate in Hz from the options or the file's metadata, when known. */
  readonly repetitionRateHz: number | undefined;
  readonly range: ChannelRange;
  /** Total recorded counts of the histogram (before any correction). */
  readonly photons: number;
  readonly pileUpCorrected: boolean;
  /** Recorded IRF counts (its sum before normalisation) and whether every value is a whole count (Poisson data). */
  readonly irfTotalCounts: number | undefined;
  readonly irfIsCounts: boolean;
  /** How the reconvolution model treats the IRF within a channel (options.irfWithinChannel). */
  readonly irfWithinChannel: IrfWithinChannel;
  readonly warnings: readonly string[];
}

/** Peak counts below which precision is poor (common practice: ≥ 10⁴ in the peak for multi-exponential work). */
export const LOW_PEAK_COUNTS = 100;

/**
 * IRF FWHM, in channels, below which the channel treatment biases short lifetimes by more than ~0.3 %
 * (noise-free fits against an exact continuous-IRF truth, docs/decay.md "Coarse channels"): 10 for the
 * flat IRF, 2.5 with the second-order treatment.
 */
export const MIN_IRF_FWHM_CHANNELS = { flat: 10, 'second-order': 2.5 } as const;

/** The coarse-channel warning for an IRF of `irfFwhmNs` on channels of `channelWidthNs`, or undefined. */
export function coarseChannelWarning(
  irfFwhmNs: number | undefined,
  channelWidthNs: number,
  mode: IrfWithinChannel,
): string | undefined {
  if (irfFwhmNs === undefined) return undefined;
  const fwhmChannels = irfFwhmNs / channelWidthNs;
  if (fwhmChannels >= MIN_IRF_FWHM_CHANNELS[mode]) return undefined;
  return (
    `the IRF FWHM spans ${fwhmChannels.toFixed(1)} channels (< ${MIN_IRF_FWHM_CHANNELS[mode]}, irfWithinChannel '${mode}'): ` +
    'lifetimes near the IRF width can be biased low by 1–6 % (docs/decay.md, coarse channels); use finer channels' +
    (mode === 'flat' ? " or irfWithinChannel 'second-order'" : '')
  );
}

/** Prepares one decay for fitting (see header); throws InputRejected for an unusable IRF. */
export function prepareDecay(decay: Decay, options: ResolvedFitDecayOptions, minimumChannels: number): PreparedDecay {
  const warnings: string[] = [];
  const channels = decay.counts.length;
  const channelWidthNs = decay.channelWidthNs;
  const repetitionRateHz = options.repetitionRateHz ?? decay.metadata.repetitionRateHz;
  const photons = totalCounts(decay.counts);
  let periodNs: number | undefined;
  if (repetitionRateHz !== undefined) {
    periodNs = 1e9 / repetitionRateHz;
    if (periodNs < channels * channelWidthNs * (1 - 1e-9)) {
      warnings.push(
        `the excitation period (${periodNs.toFixed(3)} ns) is shorter than the histogram (${(channels * channelWidthNs).toFixed(3)} ns); earlier pulses are not modelled`,
      );
      periodNs = undefined;
    }
  }
  const irfSource = options.irfCounts ?? decay.irfCounts;
  let irfUnit: Float64Array | undefined;
  let irfFwhmNs: number | undefined;
  let irfRiseChannel: number | undefined;
  let irfTotalCounts: number | undefined;
  let irfIsCounts = false;
  if (irfSource !== undefined) {
    if (irfSource.length !== channels) {
      throw new InputRejected(
        'LENGTH_MISMATCH',
        `the IRF has ${irfSource.length} channels but the decay has ${channels}`,
      );
    }
    const irf = Float64Array.from(irfSource);
    let sum = 0;
    for (let k = 0; k < channels; k++) {
      const value = itemAt(irf, k);
      if (!Number.isFinite(value) || value < 0) {
        throw new InputRejected('INPUT_INVALID', `the IRF has an invalid value (${value}) at channel ${k + 1}`);
      }
      sum += value;
    }
    if (!(sum > 0)) throw new InputRejected('INPUT_INVALID', 'the IRF has no counts');
    irfTotalCounts = sum;
    irfIsCounts = irf.every((value) => Number.isInteger(value));
    for (let k = 0; k < channels; k++) irf[k] = itemAt(irf, k) / sum;
    irfUnit = irf;
    irfFwhmNs = fullWidthHalfMaximumNs(irf, channelWidthNs);
    irfRiseChannel = firstChannelAbove(irf, IRF_RISE_FRACTION);
    const warning = coarseChannelWarning(irfFwhmNs, channelWidthNs, options.irfWithinChannel);
    if (warning !== undefined) warnings.push(warning);
  }
  let counts = decay.counts;
  let pileUpCorrected = false;
  const collectionTimeS = decay.metadata.collectionTimeS;
  const countRatePerS =
    decay.metadata.countRatePerS ??
    (collectionTimeS !== undefined && collectionTimeS > 0 ? photons / collectionTimeS : undefined);
  if (
    countRatePerS !== undefined &&
    repetitionRateHz !== undefined &&
    countRatePerS > PILE_UP_RATE_FRACTION * repetitionRateHz
  ) {
    warnings.push(
      `count rate ${countRatePerS.toPrecision(3)} /s exceeds ${PILE_UP_RATE_FRACTION * 100} % of the repetition rate ${repetitionRateHz.toPrecision(3)} Hz: pile-up distorts the decay${options.pileUpCorrection ? '' : '; apply the pile-up correction (fit-decay --pile-up-correction, config analysis.pileUpCorrection, option pileUpCorrection)'}`,
    );
  }
  if (options.pileUpCorrection) {
    if (collectionTimeS === undefined || repetitionRateHz === undefined) {
      warnings.push(
        'pile-up correction requested but the collection time or repetition rate is unknown; not applied (give the repetition rate with fit-decay --repetition-rate-mhz or config instrument.repetitionRateMHz, and a "collection time" line in the file)',
      );
    } else {
      counts = coatesCorrection(decay.counts, collectionTimeS * repetitionRateHz);
      pileUpCorrected = true;
    }
  }
  const range =
    options.rangeNs === undefined
      ? automaticRange(counts, irfUnit, channelWidthNs, options.estimator, minimumChannels)
      : channelsInRange(decay.timeNs, channelWidthNs, options.rangeNs, minimumChannels);
  let peakCounts = 0;
  for (let k = range.firstChannel; k < range.endChannel; k++) peakCounts = Math.max(peakCounts, itemAt(counts, k));
  if (peakCounts < LOW_PEAK_COUNTS) {
    warnings.push(`peak counts are low (${peakCounts} < ${LOW_PEAK_COUNTS}); lifetimes are imprecise`);
  }
  return {
    timeNs: decay.timeNs,
    channelWidthNs,
    counts,
    irfUnit,
    irfFwhmNs,
    irfRiseChannel,
    periodNs,
    repetitionRateHz,
    range,
    photons,
    pileUpCorrected,
    irfTotalCounts,
    irfIsCounts,
    irfWithinChannel: options.irfWithinChannel,
    warnings,
  };
}
