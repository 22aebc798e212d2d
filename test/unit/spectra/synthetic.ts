// Invented spectra with known truth for the spectral and photophysics tests: Gaussian bands on a nm
// axis and seeded Gaussian noise (mulberry32 + Box–Muller), so every run sees the same numbers.
import { createSpectrum, type Spectrum, type SpectrumInput } from '../../../src/model/spectrum.js';

/** Seeded uniform generator on [0, 1) (mulberry32). */
export function seededUniform(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Seeded standard normal generator (Box–Muller). */
export function seededNormal(seed: number): () => number {
  const uniform = seededUniform(seed);
  return () => Math.sqrt(-2 * Math.log(1 - uniform())) * Math.cos(2 * Math.PI * uniform());
}

/** Evenly spaced axis from..to (inclusive) with the given step. */
export function axisNm(fromNm: number, toNm: number, stepNm: number): number[] {
  const count = Math.round((toNm - fromNm) / stepNm) + 1;
  return Array.from({ length: count }, (_, i) => fromNm + i * stepNm);
}

/** Gaussian band with the given area (value·nm), centre and standard deviation in nm. */
export function gaussianBand(
  wavelengthNm: readonly number[],
  areaValueNm: number,
  centreNm: number,
  sigmaNm: number,
): number[] {
  return wavelengthNm.map(
    (x) => (areaValueNm / (sigmaNm * Math.sqrt(2 * Math.PI))) * Math.exp(-((x - centreNm) ** 2) / (2 * sigmaNm ** 2)),
  );
}

/** A spectrum from axis and values, with optional noise σ (value units) and metadata. */
export function makeSpectrum(
  kind: SpectrumInput['kind'],
  wavelengthNm: readonly number[],
  values: readonly number[],
  extras: {
    noiseSigma?: number;
    seed?: number;
    metadata?: SpectrumInput['metadata'];
    valueUnit?: string;
    valueColumn?: string;
    otherColumns?: SpectrumInput['otherColumns'];
  } = {},
): Spectrum {
  const normal = seededNormal(extras.seed ?? 1);
  const noisy =
    extras.noiseSigma === undefined ? values : values.map((v) => v + (extras.noiseSigma as number) * normal());
  return createSpectrum({
    kind,
    wavelengthNm,
    values: noisy,
    ...(extras.valueUnit === undefined ? {} : { valueUnit: extras.valueUnit }),
    ...(extras.valueColumn === undefined ? {} : { valueColumn: extras.valueColumn }),
    ...(extras.metadata === undefined ? {} : { metadata: extras.metadata }),
    ...(extras.otherColumns === undefined ? {} : { otherColumns: extras.otherColumns }),
  });
}
