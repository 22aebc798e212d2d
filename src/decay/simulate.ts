// Simulated decays with known truth, for tests, benchmarks and demos: a channel-integrated Gaussian IRF,
// the expected counts of the reconvolution model, and Poisson sampling through a seeded generator.
import { createDecay, type Decay } from '../model/decay.js';
import { normalCdf } from './normal-distribution.js';
import { samplePoisson, type UniformSource } from './random.js';
import { createReconvolutionModel } from './reconvolution-model.js';
import { itemAt } from '../model/item-at.js';

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
  for (let k = 0; k < spec.channels; k++) irfSum += itemAt(spec.irf, k);
  const irfUnit = Float64Array.from(spec.irf, (value) => value / irfSum);
  const model = createReconvolutionModel({
    irfUnit,
    channelWidthNs: spec.channelWidthNs,
    periodNs: spec.periodNs,
    firstChannel: 0,
    endChannel: spec.channels,
    components,
  });
  const jacobian = new Float64Array((2 * components + 3) * spec.channels);
  const expected = new Float64Array(spec.channels);
  const local = new Float64Array(2 * components + 3);
  for (let i = 0; i < components; i++) {
    local[i] = itemAt(spec.tauNs, i);
    local[components + i] = 1;
  }
  local[2 * components] = spec.shiftNs ?? 0;
  model.evaluate(local, true, expected, jacobian);
  for (let i = 0; i < components; i++) {
    let responseSum = 0;
    for (let k = 0; k < spec.channels; k++) responseSum += itemAt(jacobian, (components + i) * spec.channels + k);
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

export interface ExactGaussianDecaySpec {
  readonly channels: number;
  readonly channelWidthNs: number;
  /** Centre and FWHM of the (continuous) Gaussian IRF, ns. */
  readonly irfCentreNs: number;
  readonly irfFwhmNs: number;
  readonly tauNs: readonly number[];
  /** Intensity fractions (sum 1); default equal. */
  readonly intensityFractions?: readonly number[];
  /** Expected decay photons over an unbounded window. */
  readonly photons: number;
  readonly backgroundPerChannel?: number;
}

/**
 * Expected counts per channel of a continuous Gaussian IRF convolved with Σ exponentials, integrated over
 * each channel in closed form: the CDF of the exponentially modified Gaussian,
 * F(t) = Φ(z) − exp(−(t − μ)/τ + σ²/(2τ²))·Φ(z − σ/τ), z = (t − μ)/σ (Grushka, Anal. Chem. 44, 1733 (1972)).
 * Independent of the reconvolution model (no histogram IRF), so it measures the model's channel error; O(c·channels).
 */
export function exactGaussianDecayCounts(spec: ExactGaussianDecaySpec): Float64Array {
  const sigmaNs = spec.irfFwhmNs / (2 * Math.sqrt(2 * Math.log(2)));
  const expected = new Float64Array(spec.channels).fill(spec.backgroundPerChannel ?? 0);
  spec.tauNs.forEach((tauNs, i) => {
    const photons = spec.photons * (spec.intensityFractions?.[i] ?? 1 / spec.tauNs.length);
    const cdf = (timeNs: number): number => {
      const z = (timeNs - spec.irfCentreNs) / sigmaNs;
      const exponent = -(timeNs - spec.irfCentreNs) / tauNs + (sigmaNs * sigmaNs) / (2 * tauNs * tauNs);
      return normalCdf(z) - Math.exp(exponent) * normalCdf(z - sigmaNs / tauNs);
    };
    let previous = cdf(0);
    for (let k = 0; k < spec.channels; k++) {
      const next = cdf((k + 1) * spec.channelWidthNs);
      expected[k] = itemAt(expected, k) + photons * Math.max(next - previous, 0);
      previous = next;
    }
  });
  return expected;
}
