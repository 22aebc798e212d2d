// A seeded generator of our own for yield sets (invented "teal" control against rhodamine 6G in ethanol):
// emission bands attenuated by the centred right-angle inner-filter model (Lakowicz, 3rd ed., ch. 2),
// measured absorbances with photometric noise, written as real files and wrapped in a job payload.
import { createHash } from 'node:crypto';
import type { AnalysisJobPayload, AnalysisSettings, PayloadFile } from '../../src/analysis/payload.js';
import type { SetPart } from '../../src/analysis/result.js';
import { sampleStandardNormal, type UniformSource } from '../../src/decay/index.js';
import {
  absorbanceSpectrum,
  decayHistogram,
  emissionIntegralUnattenuated,
  emissionSpectrum,
} from '../../src/demo/synthetic.js';
import { writeDecayCsv, writeSpectrumCsv, writeSpectrumJcamp } from '../../src/formats/index.js';
import { createSpectrum, withValues, type MeasurementRole, type Spectrum } from '../../src/model/spectrum.js';

export const ETHANOL_N = 1.3618; // CRC, 20 °C (REFERENCES.md, confirmed)
export const R6G_YIELD = 0.95; // rhodamine 6G in ethanol, the standards table's value (the generator's truth for the reference)

export interface YieldSetSpec {
  readonly sampleYield: number;
  readonly sampleAbsorbance: number;
  readonly referenceAbsorbance: number;
  readonly excitationNm?: number;
  /** Photometric noise added to the absorbance spectra (absorbance units, default 0.0005). */
  readonly absorbanceNoise?: number;
  readonly sampleRangeNm?: readonly [number, number];
  readonly referenceRangeNm?: readonly [number, number];
  /** Sample absorption band (default peak 511 nm, FWHM 55 nm). */
  readonly sampleBand?: { readonly peakNm: number; readonly widthNm: number };
  /** Reference absorption band (default peak 528 nm, FWHM 60 nm). */
  readonly referenceBand?: { readonly peakNm: number; readonly widthNm: number };
  readonly withDecay?: boolean;
  /** A solvent blank (flat dark level plus a Raman-like band) present in both emission exports, and its file (paired). */
  readonly blank?: { readonly solvent: string };
  readonly settings?: Partial<AnalysisSettings>;
}

/** The blank's level in counts at `nm`: 40 counts of dark level plus a band of 900 counts at 558 nm (σ 4 nm). */
export function blankLevelAt(nm: number): number {
  return 40 + 900 * Math.exp(-((nm - 558) ** 2) / (2 * 4 ** 2));
}

const sha = (text: string): string => createHash('sha256').update(text).digest('hex');

function payloadFile(
  name: string,
  content: string,
  part: SetPart,
  role: MeasurementRole,
  origin: PayloadFile['origin'] = 'own',
): PayloadFile {
  return {
    name,
    sha256: sha(content),
    part,
    role,
    origin,
    content,
    ...(origin === 'paired' ? { pairedFromSetId: 'ref-set' } : {}),
  };
}

/** Adds N(0, σ²) to every point of an absorbance file's values (a measured, not a true, absorbance). */
function withPhotometricNoise(values: Float64Array, sigma: number, random: UniformSource): Float64Array {
  return values.map((v) => v + sigma * sampleStandardNormal(random));
}

export const BASE_SETTINGS: AnalysisSettings = {
  components: 1,
  estimator: 'ml',
  innerFilter: 'centred',
  maxAbsorbanceForYield: 0.1,
  refractiveIndex: {},
  defaultRefractiveIndex: 1.333,
  cuvette: { pathLengthCm: 1, excitationWindowStartCm: 0.4, excitationWindowEndCm: 0.6 },
  maxFileBytes: 50_000_000,
  reference: { standardId: 'rhodamine-6g-ethanol' },
};

/** A control set and its paired reference, generated from `random`. */
export function yieldSet(spec: YieldSetSpec, random: UniformSource, setId = 'teal-test'): AnalysisJobPayload {
  const excitationNm = spec.excitationNm ?? 480;
  const sampleShape = spec.sampleBand ?? { peakNm: 511, widthNm: 55 };
  const sampleBand = {
    bandPeakNm: sampleShape.peakNm,
    bandWidthNm: sampleShape.widthNm,
    excitationNm,
    absorbanceAtExcitation: spec.sampleAbsorbance,
  };
  const refBandShape = spec.referenceBand ?? { peakNm: 528, widthNm: 60 };
  const referenceBand = {
    bandPeakNm: refBandShape.peakNm,
    bandWidthNm: refBandShape.widthNm,
    excitationNm,
    absorbanceAtExcitation: spec.referenceAbsorbance,
  };
  const [sFrom, sTo] = spec.sampleRangeNm ?? [excitationNm + 10, 745];
  const [rFrom, rTo] = spec.referenceRangeNm ?? [excitationNm + 10, 745];
  const meta = { excitationNm, solvent: 'ethanol' };
  const sampleEm = emissionSpectrum(
    {
      peakNm: 536,
      widthNm: 42,
      integral: emissionIntegralUnattenuated(spec.sampleYield, spec.sampleAbsorbance, ETHANOL_N),
      fromNm: sFrom,
      toNm: sTo,
      innerFilter: sampleBand,
      noiseRelative: 0.003,
    },
    { ...meta, sampleId: 'CTRL-teal', role: 'control' },
    random,
  );
  const referenceEm = emissionSpectrum(
    {
      peakNm: 552,
      widthNm: 38,
      integral: emissionIntegralUnattenuated(R6G_YIELD, spec.referenceAbsorbance, ETHANOL_N),
      fromNm: rFrom,
      toNm: rTo,
      innerFilter: referenceBand,
      noiseRelative: 0.003,
    },
    { ...meta, sampleId: 'REF-R6G', role: 'reference' },
    random,
  );
  const withBlank = (s: Spectrum): Spectrum =>
    spec.blank === undefined
      ? s
      : withValues(
          s,
          s.values.map((v, i) => v + blankLevelAt(s.wavelengthNm[i] as number)),
        );
  const noise = spec.absorbanceNoise ?? 0.0005;
  const sampleAbs = absorbanceSpectrum(sampleBand, { sampleId: 'CTRL-teal', solvent: 'ethanol' }, random);
  const referenceAbs = absorbanceSpectrum(referenceBand, { sampleId: 'REF-R6G', solvent: 'ethanol' }, random);
  const noisyAbs = (s: Spectrum): Spectrum => withValues(s, withPhotometricNoise(s.values, noise, random));
  const files: PayloadFile[] = [
    payloadFile('teal_em.csv', writeSpectrumCsv(withBlank(sampleEm)), 'emission', 'control'),
    payloadFile('teal_abs.jdx', writeSpectrumJcamp(noisyAbs(sampleAbs)), 'absorbance', 'absorbance'),
    payloadFile('r6g_em.csv', writeSpectrumCsv(withBlank(referenceEm)), 'reference-emission', 'reference', 'paired'),
    payloadFile(
      'r6g_abs.jdx',
      writeSpectrumJcamp(noisyAbs(referenceAbs)),
      'reference-absorbance',
      'reference',
      'paired',
    ),
  ];
  if (spec.blank !== undefined) {
    const axis = Float64Array.from({ length: 301 }, (_u, i) => excitationNm + i);
    const blank = createSpectrum({
      kind: 'blank',
      wavelengthNm: axis,
      values: axis.map(blankLevelAt),
      valueUnit: 'counts',
      valueColumn: 'intensity',
      metadata: { sampleId: 'solvent-blank', role: 'blank', excitationNm, solvent: spec.blank.solvent },
    });
    files.push(payloadFile('solvent_blank.csv', writeSpectrumCsv(blank), 'blank', 'blank', 'paired'));
  }
  if (spec.withDecay === true) {
    const decay = decayHistogram(
      { tauNs: [4.1], photons: 200_000, channels: 512, channelWidthNs: 0.05 },
      { sampleId: 'CTRL-teal', excitationNm },
      random,
    );
    files.push(payloadFile('teal_decay.csv', writeDecayCsv(decay), 'decay', 'control'));
  }
  return {
    setId,
    role: 'control',
    sampleId: 'CTRL-teal',
    sampleInfo: {},
    files,
    missingParts: [],
    settings: { ...BASE_SETTINGS, ...spec.settings },
    analyzedAt: '2026-12-05T12:00:00.000Z',
    configHash: 'c'.repeat(64),
    softwareVersion: '0.1.0',
  };
}
