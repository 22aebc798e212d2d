// Simulated decays with known truth, for tests, benchmarks and demos: a channel-integrated Gaussian IRF,
// the expected counts of the reconvolution model, and Poisson sampling through a seeded generator.
import { createDecay, type Decay } from '../model/decay.js';
import { normalCdf } from './normal-distribution.js';
import { samplePoisson, type UniformSource } from './random.js';
import { createReconvolutionModel } from './reconvolution-model.js';

export interface DecaySimulation {
  readonly channels: number;
  readonly channelWidthNs: number;
  /** Lifetimes in ns. */
  readonly tauNs: readonly number[];
  /** Fraction of the decay photons in each component (intensity fractions, sum 1). Default equal. */
  readonly intensityFractions?: readonly number[];
  /** Expected decay photons over the whole histogram (background excluded). */
  readonly photons: number;
  /** IRF counts (any scale) on the same channels. */
  readonly irf: Float64Array;
  readonly backgroundPerChannel?: number;
  readonly shiftNs?: number;
  /** Excitation period in ns (earlier pulses included) when given. */
  readonly periodNs?: number;
}

/** Gaussian IRF integrated over each channel (unit sum over an infinite axis), centre and FWHM in ns; O(channels). */
export function gaussianIrf(channels: number, channelWidthNs: number, centreNs: number, fwhmNs: number): Float64Array {
  const sigmaNs = fwhmNs / (2 * Math.sqrt(2 * Math.log(2)));
  const irf = new Float64Array(channels);
  for (let k = 0; k < channels; k++) {
    const low = (k * channelWidthNs - centreNs) / sigmaNs;
    const high = ((k + 1) * channelWidthNs - centreNs) / sigmaNs;
    irf[k] = low > 0 ? normalCdf(-low) - normalCdf(-high) : normalCdf(high) - normalCdf(low);
  }
  return irf;
}

/** Expected counts per channel of the reconvolution model for a simulation spec (no noise); O(c·channels). */
export function expectedDecayCounts(spec: DecaySimulation): Float64Array {
  const components = spec.tauNs.length;
  let irfSum = 0;
  for (let k = 0; k < spec.channels; k++) irfSum += spec.irf[k] as number;
  const irfUnit = Float64Array.from(spec.irf, (value) => value / irfSum);
  const model = createReconvolutionModel({
    irfUnit, channelWidthNs: spec.channelWidthNs, periodNs: spec.periodNs, firstChannel: 0, endChannel: spec.channels, components,
  });
  const jacobian = new Float64Array((2 * components + 3) * spec.channels);
  const expected = new Float64Array(spec.channels);
  const local = new Float64Array(2 * components + 3);
  for (let i = 0; i < components; i++) {
    local[i] = spec.tauNs[i] as number;
    local[components + i] = 1;
  }
  local[2 * components] = spec.shiftNs ?? 0;
  model.evaluate(local, true, expected, jacobian);
  for (let i = 0; i < components; i++) {
    let responseSum = 0;
    for (let k = 0; k < spec.channels; k++) responseSum += jacobian[(components + i) * spec.channels + k] as number;
    const fraction = spec.intensityFractions?.[i] ?? 1 / components;
    local[components + i] = (fraction * spec.photons) / responseSum;
  }
  local[2 * components + 1] = spec.backgroundPerChannel ?? 0;
  model.evaluate(local, false, expected, jacobian);
  return expected;
}

/** Poisson-sampled decay (with the IRF attached as irfCounts) from a spec and a seeded generator. */
export function simulateDecay(spec: DecaySimulation, random: UniformSource, repetitionRateHz?: number): Decay {
  const expected = expectedDecayCounts(spec);
  const counts = Float64Array.from(expected, (mean) => samplePoisson(mean, random));
  return createDecay({
    timeNs: Float64Array.from({ length: spec.channels }, (_unused, k) => k * spec.channelWidthNs),
    counts,
    channelWidthNs: spec.channelWidthNs,
    irfCounts: spec.irf,
    metadata: repetitionRateHz === undefined ? {} : { repetitionRateHz },
  });
}
