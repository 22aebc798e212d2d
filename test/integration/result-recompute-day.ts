// An invented day for the sign-off recomputation (test/integration/result-recompute.test.ts): a
// reference standard (rhodamine 6G in ethanol), one sample and the daily control, a solvent blank
// (ethanol Raman band plus a flat dark level, present in every emission export of the day), and the
// instrument's detector correction curve (correction factors: the exports carry the detector's
// response, the curve undoes it). Built with the project's seeded generators (src/demo/synthetic.ts);
// the absorbance axes sit half a nanometre off the excitation wavelength so A(λex) is interpolated.
import { writeDecayCsv, writeSpectrumCsv, writeSpectrumJcamp } from '../../src/formats/index.js';
import { createSpectrum, type Spectrum } from '../../src/model/spectrum.js';
import {
  absorbanceSpectrum,
  decayHistogram,
  emissionIntegralUnattenuated,
  emissionSpectrum,
} from '../../src/demo/synthetic.js';
import { createSeededRandom } from '../../src/decay/index.js';

export const DAY_EXCITATION_NM = 480;
const ETHANOL_N = 1.3618; // CRC Handbook, sodium D line, 20 °C (shared/REFERENCES.md, confirmed)
const DAY = '2026-05-20';

/** Ethanol's C–H stretch Raman band (≈ 2930 cm⁻¹, from memory) at 480 nm excitation, plus a flat dark level, noiseless. */
export function blankLevelAt(nm: number): number {
  const ramanNm = 1 / (1 / DAY_EXCITATION_NM - 2930e-7);
  return 40 + 900 * Math.exp(-((nm - ramanNm) ** 2) / (2 * 4 ** 2));
}

/** Relative detector response the exports carry (the correction factor is its reciprocal). */
export function detectorResponseAt(nm: number): number {
  return 1 - 0.35 * ((nm - 560) / 200) ** 2;
}

function withBackgroundAndResponse(emission: Spectrum): Spectrum {
  const values = Float64Array.from(emission.wavelengthNm, (nm, i) => {
    const v = (emission.values[i] as number) * detectorResponseAt(nm) + blankLevelAt(nm);
    return Math.round(v * 1000) / 1000;
  });
  return createSpectrum({ ...emission, values, metadata: emission.metadata });
}

export interface RecomputeDay {
  readonly files: readonly { readonly name: string; readonly content: string }[];
  readonly detectorCurve: string;
  readonly truth: Readonly<Record<string, { quantumYield: number; tauNs?: number }>>;
}

/** The day's files (seeded), the detector curve file's content and the generator's truth. */
export function generateRecomputeDay(seed = 20260520): RecomputeDay {
  const random = createSeededRandom(seed);
  const files: { name: string; content: string }[] = [];
  const at = (hhmm: string): string => `${DAY}T${hhmm}:00Z`;
  const truth: Record<string, { quantumYield: number; tauNs?: number }> = {};

  // The blank: solvent in the same cell, same excitation, before the samples.
  const blankAxis = Float64Array.from({ length: 251 }, (_u, i) => 480 + i);
  const blank = createSpectrum({
    kind: 'blank',
    wavelengthNm: blankAxis,
    values: Float64Array.from(blankAxis, (nm) => Math.round(blankLevelAt(nm) * 1000) / 1000),
    valueUnit: 'counts',
    valueColumn: 'intensity',
    metadata: {
      sampleId: 'ethanol-blank',
      role: 'blank',
      excitationNm: DAY_EXCITATION_NM,
      solvent: 'ethanol',
      acquiredAt: at('08:20'),
    },
  });
  files.push({ name: 'ethanol-blank_blank.csv', content: writeSpectrumCsv(blank) });

  const measured = [
    { id: 'REF-R6G-0520', role: 'reference' as const, qy: 0.95, a: 0.042, peak: 552, width: 38, band: 528 },
    { id: 'lilac-07', role: 'sample' as const, qy: 0.41, a: 0.033, peak: 574, width: 44, band: 540, tau: 2.7 },
    { id: 'CTRL-teal-0520', role: 'control' as const, qy: 0.8, a: 0.036, peak: 536, width: 42, band: 511, tau: 4.1 },
  ];
  for (const s of measured) {
    const band = { bandPeakNm: s.band, bandWidthNm: 58, excitationNm: DAY_EXCITATION_NM, absorbanceAtExcitation: s.a };
    const em = emissionSpectrum(
      {
        peakNm: s.peak,
        widthNm: s.width,
        integral: emissionIntegralUnattenuated(s.qy, s.a, ETHANOL_N),
        innerFilter: band,
        fromNm: 490,
        toNm: 720,
      },
      {
        sampleId: s.id,
        role: s.role,
        excitationNm: DAY_EXCITATION_NM,
        solvent: 'ethanol',
        acquiredAt: at(s.role === 'reference' ? '08:40' : '10:00'),
      },
      random,
    );
    const abs = absorbanceSpectrum(
      { ...band, fromNm: 350.5, toNm: 749.5 },
      { sampleId: s.id, role: s.role, solvent: 'ethanol', acquiredAt: at(s.role === 'reference' ? '08:35' : '09:55') },
      random,
    );
    files.push({ name: `${s.id}_em.csv`, content: writeSpectrumCsv(withBackgroundAndResponse(em)) });
    files.push({
      name: s.role === 'sample' ? `${s.id}_abs.jdx` : `${s.id}_abs.csv`,
      content: s.role === 'sample' ? writeSpectrumJcamp(abs) : writeSpectrumCsv(abs),
    });
    truth[s.id] = { quantumYield: s.qy, ...(s.tau === undefined ? {} : { tauNs: s.tau }) };
    if (s.tau !== undefined) {
      const decay = decayHistogram(
        { tauNs: [s.tau], photons: 200_000, channels: 512, channelWidthNs: 0.05, irfCentreNs: 1.7 },
        { sampleId: s.id, excitationNm: 470, emissionNm: s.peak, acquiredAt: at('10:10') },
        random,
      );
      files.push({ name: `${s.id}_decay.csv`, content: writeDecayCsv(decay) });
    }
  }

  const curveAxis = Float64Array.from({ length: 53 }, (_u, i) => 460 + 5 * i);
  const curve = createSpectrum({
    kind: 'detector-correction',
    wavelengthNm: curveAxis,
    values: Float64Array.from(curveAxis, (nm) => Number((1 / detectorResponseAt(nm)).toPrecision(10))),
    valueUnit: 'factor',
    valueColumn: 'correction factor',
    metadata: { acquiredAt: at('07:00') },
  });
  return { files, detectorCurve: writeSpectrumCsv(curve), truth };
}

/** driftlight.yaml of the day: the reference standard, the control with its targets, the detector curve. */
export const RECOMPUTE_CONFIG = [
  'folders: { inbox: inbox, archive: archive, quarantine: quarantine, results: results, outbox: outbox, state: state }',
  'references:',
  '  - { id: r6g, sampleIdPattern: "^REF-R6G", standardId: rhodamine-6g-ethanol }',
  'controls:',
  '  - { id: teal, sampleIdPattern: "^CTRL-teal", targetYield: 0.8, sdYield: 0.03, targetTauNs: 4.1, sdTauNs: 0.1 }',
  'instrument: { detectorCorrectionFile: detector-curve.csv }',
  'assembly: { requiredParts: [emission, absorbance, decay, irf, blank] }',
  'logging: { level: info, stdout: off }',
  '',
].join('\n');
