// Synthetic measurements with known truth (seeded): emission and absorbance bands, and TCSPC decays
// from the decay module's simulator. Used by the demo scenario, tests and benchmarks.
import { createSpectrum, type Spectrum, type SpectrumMetadata } from '../model/spectrum.js';
import type { Decay, DecayMetadata } from '../model/decay.js';
import { createDecay } from '../model/decay.js';
import { gaussianIrf, sampleStandardNormal, simulateDecay, type UniformSource } from '../decay/index.js';

function axis(fromNm: number, toNm: number, stepNm: number): Float64Array {
  const n = Math.round((toNm - fromNm) / stepNm) + 1;
  return Float64Array.from({ length: n }, (_u, i) => fromNm + i * stepNm);
}

/** Integrated emission that a yield `quantumYield` gives in this scenario: K·Φ·(1 − 10^(−A))/n² (Brouwer 2011 proportionality). */
export function emissionIntegralFor(
  quantumYield: number,
  absorbanceAtExcitation: number,
  refractiveIndex: number,
  scale = 1e7,
): number {
  return (scale * quantumYield * (1 - 10 ** -absorbanceAtExcitation)) / refractiveIndex ** 2;
}

/** Integral of the unattenuated band in the centred right-angle model: K·Φ·ln10·A/n² (dilute limit; observed = this × 10^(−(A_ex+A_em)/2), Lakowicz ch. 2). */
export function emissionIntegralUnattenuated(
  quantumYield: number,
  absorbanceAtExcitation: number,
  refractiveIndex: number,
  scale = 1e7,
): number {
  return (scale * quantumYield * Math.LN10 * absorbanceAtExcitation) / refractiveIndex ** 2;
}

/** The absorption band of absorbanceSpectrum as a noiseless function of nm (for attenuating an emission band). */
export function absorbanceBandAt(band: {
  bandPeakNm: number;
  bandWidthNm: number;
  excitationNm: number;
  absorbanceAtExcitation: number;
}): (nm: number) => number {
  const sigma = band.bandWidthNm / (2 * Math.sqrt(2 * Math.log(2)));
  const shape = (nm: number): number => Math.exp(-((nm - band.bandPeakNm) ** 2) / (2 * sigma * sigma));
  const peak = band.absorbanceAtExcitation / shape(band.excitationNm);
  return (nm) => peak * shape(nm);
}

/**
 * A Gaussian emission band (nm) whose integral is `integral`, with seeded noise (relative to the peak). With `innerFilter`
 * (the sample's absorption band), each point is attenuated by 10^(−(A_ex + A_em(λ))/2), the centred right-angle model
 * (Lakowicz, 3rd ed., ch. 2), and `integral` is that of the unattenuated band.
 */
export function emissionSpectrum(
  spec: {
    peakNm: number;
    widthNm: number;
    integral: number;
    fromNm?: number;
    toNm?: number;
    stepNm?: number;
    noiseRelative?: number;
    innerFilter?: { bandPeakNm: number; bandWidthNm: number; excitationNm: number; absorbanceAtExcitation: number };
  },
  metadata: Partial<SpectrumMetadata>,
  random: UniformSource,
): Spectrum {
  const wavelengthNm = axis(spec.fromNm ?? 490, spec.toNm ?? 720, spec.stepNm ?? 1);
  const sigma = spec.widthNm / (2 * Math.sqrt(2 * Math.log(2)));
  const peak = spec.integral / (sigma * Math.sqrt(2 * Math.PI));
  const noise = (spec.noiseRelative ?? 0.002) * peak;
  const band = spec.innerFilter === undefined ? undefined : absorbanceBandAt(spec.innerFilter);
  const excitationAbsorbance = spec.innerFilter?.absorbanceAtExcitation ?? 0;
  const values = Float64Array.from(wavelengthNm, (nm) => {
    const attenuation = band === undefined ? 1 : 10 ** (-(excitationAbsorbance + band(nm)) / 2);
    const v =
      peak * attenuation * Math.exp(-((nm - spec.peakNm) ** 2) / (2 * sigma * sigma)) +
      noise * sampleStandardNormal(random);
    return Math.round(v * 1000) / 1000;
  });
  return createSpectrum({
    kind: 'emission',
    wavelengthNm,
    values,
    valueUnit: 'counts',
    valueColumn: 'intensity',
    metadata,
  });
}

/** A Gaussian absorption band (nm) with absorbance `absorbanceAtExcitation` at `excitationNm`. */
export function absorbanceSpectrum(
  spec: {
    bandPeakNm: number;
    bandWidthNm: number;
    excitationNm: number;
    absorbanceAtExcitation: number;
    fromNm?: number;
    toNm?: number;
  },
  metadata: Partial<SpectrumMetadata>,
  random: UniformSource,
): Spectrum {
  const wavelengthNm = axis(spec.fromNm ?? 350, spec.toNm ?? 750, 1);
  const sigma = spec.bandWidthNm / (2 * Math.sqrt(2 * Math.log(2)));
  const shape = (nm: number): number => Math.exp(-((nm - spec.bandPeakNm) ** 2) / (2 * sigma * sigma));
  const peak = spec.absorbanceAtExcitation / shape(spec.excitationNm);
  const values = Float64Array.from(
    wavelengthNm,
    (nm) => Math.round((peak * shape(nm) + 0.00002 * sampleStandardNormal(random)) * 1e6) / 1e6,
  );
  return createSpectrum({
    kind: 'absorbance',
    wavelengthNm,
    values,
    valueUnit: 'absorbance',
    valueColumn: 'absorbance',
    metadata: { pathLengthCm: 1, ...metadata },
  });
}

export interface DecaySpec {
  readonly tauNs: readonly number[];
  readonly intensityFractions?: readonly number[];
  readonly photons: number;
  readonly channels: number;
  readonly channelWidthNs: number;
  readonly irfCentreNs?: number;
  readonly irfFwhmNs?: number;
  readonly backgroundPerChannel?: number;
}

/** A Poisson-sampled decay with its IRF column (drop it with `withoutIrf`). */
export function decayHistogram(spec: DecaySpec, metadata: Partial<DecayMetadata>, random: UniformSource): Decay {
  const irf = gaussianIrf(spec.channels, spec.channelWidthNs, spec.irfCentreNs ?? 1.5, spec.irfFwhmNs ?? 0.25);
  const irfCounts = Float64Array.from(irf, (v) => Math.round(v * 20000));
  const simulated = simulateDecay(
    {
      channels: spec.channels,
      channelWidthNs: spec.channelWidthNs,
      tauNs: spec.tauNs,
      photons: spec.photons,
      irf: irfCounts,
      backgroundPerChannel: spec.backgroundPerChannel ?? 2,
      ...(spec.intensityFractions === undefined ? {} : { intensityFractions: spec.intensityFractions }),
    },
    random,
  );
  // Channel times rounded to 12 significant digits so the exported files read 0.15, not 0.15000000000000002.
  const timeNs = Float64Array.from(simulated.timeNs, (t) => Number(t.toPrecision(12)));
  return createDecay({ timeNs, counts: simulated.counts, channelWidthNs: spec.channelWidthNs, irfCounts, metadata });
}

/** The same decay without its IRF column. */
export function withoutIrf(decay: Decay): Decay {
  return createDecay({
    timeNs: decay.timeNs,
    counts: decay.counts,
    channelWidthNs: decay.channelWidthNs,
    metadata: decay.metadata,
  });
}

/** The IRF of a decay as a decay file of its own (role irf). */
export function irfAsDecay(decay: Decay, metadata: Partial<DecayMetadata>): Decay {
  if (decay.irfCounts === undefined) throw new Error('the decay has no IRF column');
  return createDecay({
    timeNs: decay.timeNs,
    counts: decay.irfCounts,
    channelWidthNs: decay.channelWidthNs,
    metadata: { role: 'irf', ...metadata },
  });
}
