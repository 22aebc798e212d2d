// Light from earlier excitation pulses (issue 17.1). With periodic excitation, a decay that has not died
// out when the next pulse arrives adds its tail to the next histogram; the periodic model (exponential-
// convolution.ts) handles it when the repetition rate is known. When it is not known, a fitted decay still
// above TAIL_END_FRACTION of its peak at the end of the window, or counts before the rise well above the
// fitted background, say that earlier pulses may be in the data: the lifetime is then biased (a 4 ns dye
// at 80 MHz came out ~10 % low) and the fit is flagged. With the rate known and τ long against the period,
// the wrapped tail is nearly a constant and trades off against the background (see docs/decay.md): the
// background may then go below 0 (component-fit.ts) and a poorly determined τ is not acceptable (acceptability.ts).
import { itemAt } from '../model/item-at.js';

/** The fitted decay must fall below this fraction of its peak by the window end (1 %; this project's choice). */
export const TAIL_END_FRACTION = 0.01;
/** Pre-rise excess over the fitted background, in Poisson standard errors, that counts as earlier-pulse light. */
export const PRE_RISE_EXCESS_Z = 4;
/**
 * Above this τ / period the periodic tail is nearly flat and trades off against a free background. With b held
 * ≥ 0 that censored the trade-off and biased τ low (80 MHz, 10⁵ photons: 6 ns −0.5 %, 8 ns −1.0 %, 20 ns −6.4 %);
 * the background may now go below 0 (component-fit.ts), which removes that bias but leaves τ poorly determined
 * at 20 ns (spread ±60 %, mean +15 %, 1/τ unbiased; test/unit/decay/earlier-pulses.test.ts, docs/decay.md).
 */
export const PERIODIC_BACKGROUND_DEGENERACY_RATIO = 0.4;

/** Where to set the repetition rate, named in warnings. */
export const REPETITION_RATE_HINT =
  'give the repetition rate (fit-decay --repetition-rate-mhz, config instrument.repetitionRateMHz, or a "repetition rate" line in the file)';

export interface EarlierPulseInput {
  /** Recorded counts of the whole histogram (as fitted). */
  readonly counts: ArrayLike<number>;
  /** Fitted model on the fit range [firstChannel, endChannel). */
  readonly model: ArrayLike<number>;
  readonly firstChannel: number;
  /** Fitted background per channel. */
  readonly backgroundPerChannel: number;
}

/**
 * Why light from earlier pulses may be in a decay fitted without a repetition rate, or undefined: the fitted
 * decay (model − background) at the range end above TAIL_END_FRACTION of its peak, or the mean counts of the
 * channels before the fit range above the background by more than PRE_RISE_EXCESS_Z Poisson errors. O(n).
 */
export function earlierPulseSuspicion(input: EarlierPulseInput): string | undefined {
  const { counts, model, firstChannel, backgroundPerChannel } = input;
  let peak = 0;
  for (let k = 0; k < model.length; k++) peak = Math.max(peak, itemAt(model, k) - backgroundPerChannel);
  const causes: string[] = [];
  const atEnd = model.length > 0 ? itemAt(model, model.length - 1) - backgroundPerChannel : 0;
  if (peak > 0 && atEnd > TAIL_END_FRACTION * peak) {
    causes.push(
      `the fitted decay is still ${((100 * atEnd) / peak).toPrecision(2)} % of its peak at the end of the window`,
    );
  }
  if (firstChannel >= 5) {
    let sum = 0;
    for (let k = 0; k < firstChannel; k++) sum += itemAt(counts, k);
    const mean = sum / firstChannel;
    const error = Math.sqrt(Math.max(backgroundPerChannel, 1) / firstChannel);
    if (mean - backgroundPerChannel > PRE_RISE_EXCESS_Z * error) {
      causes.push(
        `the counts before the rise (${mean.toPrecision(3)} per channel) are above the fitted background (${backgroundPerChannel.toPrecision(3)})`,
      );
    }
  }
  if (causes.length === 0) return undefined;
  return `light from earlier pulses may be in the decay: ${causes.join(' and ')}, and the repetition rate is unknown, so earlier pulses are not modelled and τ is biased; ${REPETITION_RATE_HINT}`;
}

/** A warning when the periodic tail is nearly flat (τ > 0.4 × period): τ and the background trade off; undefined otherwise. */
export function periodicBackgroundWarning(
  tauNs: number,
  periodNs: number,
  backgroundFree: boolean,
): string | undefined {
  if (!backgroundFree || tauNs <= PERIODIC_BACKGROUND_DEGENERACY_RATIO * periodNs) return undefined;
  return `τ = ${tauNs.toPrecision(3)} ns is longer than ${PERIODIC_BACKGROUND_DEGENERACY_RATIO} × the pulse period (${periodNs.toPrecision(3)} ns): the tail of earlier pulses is nearly a constant and τ trades off against the free background, a degeneracy of the data, not of the fit; the background may go below 0 so that τ is not biased by a bound, but the longer τ is against the period, the worse τ is determined (at 2.5 × the period and 10⁵ photons: spread ±60 %, mean over repeats 15 % high, 1/τ unbiased; docs/decay.md); read the profile interval rather than ±SE; fix the background from a dark measurement (fit-decay --fix background=N) or lower the repetition rate`;
}
