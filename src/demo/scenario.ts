// The demo scenario (invented): one day at the "Brightwater teaching bench" — a reference standard,
// two samples of the invented dye series "orchid", the daily control "teal", an IRF, a set declared
// by a manifest, and one malformed export. Seeded, so the files and their truth are reproducible.
import { writeDecayCsv, writeSpectrumCsv, writeSpectrumJcamp } from '../formats/index.js';
import type { Spectrum } from '../model/spectrum.js';
import {
  absorbanceSpectrum,
  decayHistogram,
  emissionIntegralUnattenuated,
  emissionSpectrum,
  irfAsDecay,
  withoutIrf,
} from './synthetic.js';
import { createSeededRandom } from '../decay/index.js';

export interface DemoFile {
  readonly name: string;
  readonly content: string;
}

export interface DemoTruth {
  readonly sampleId: string;
  readonly role: 'sample' | 'control' | 'reference';
  readonly quantumYield: number;
  readonly tauNs?: number;
  readonly krPerS?: number;
  readonly knrPerS?: number;
}

export interface DemoDay {
  readonly files: readonly DemoFile[];
  readonly truth: readonly DemoTruth[];
  readonly config: string;
}

const ETHANOL_N = 1.3618;
const EXCITATION_NM = 480;
const DAY = '2026-03-14';

/** Semicolon-separated text with decimal commas and a free-form header (a second layout). */
function europeanText(spectrum: Spectrum, header: readonly string[]): string {
  const rows = Array.from(
    spectrum.wavelengthNm,
    (nm, i) => `${String(nm).replace('.', ',')};${String(spectrum.values[i]).replace('.', ',')}`,
  );
  return `${[...header, 'Wavelength [nm];Intensity [counts]', ...rows].join('\r\n')}\r\n`;
}

/** Tab-separated text with a short header (a third layout). */
function tabText(spectrum: Spectrum, header: readonly string[], valueName: string): string {
  const rows = Array.from(spectrum.wavelengthNm, (nm, i) => `${nm}\t${spectrum.values[i]}`);
  return `${[...header, `wavelength (nm)\t${valueName}`, ...rows].join('\n')}\n`;
}

/** Generates the demo day (files, truth, config) from `seed`; decays have `channels` channels. */
export function generateDemoDay(seed = 20260314, channels = 512, channelWidthNs = 0.05): DemoDay {
  const random = createSeededRandom(seed);
  const files: DemoFile[] = [];
  const truth: DemoTruth[] = [];
  const at = (hhmm: string): string => `${DAY}T${hhmm}:00Z`;
  const decaySpec = (tauNs: number) => ({ tauNs: [tauNs], photons: 300_000, channels, channelWidthNs });

  // Reference standard: rhodamine 6G in ethanol (Φ = 0.95 in the standards table).
  const refA = 0.045;
  const refBand = { bandPeakNm: 528, bandWidthNm: 60, excitationNm: EXCITATION_NM, absorbanceAtExcitation: refA };
  const refEm = emissionSpectrum(
    { peakNm: 552, widthNm: 38, integral: emissionIntegralUnattenuated(0.95, refA, ETHANOL_N), innerFilter: refBand },
    {
      sampleId: 'REF-R6G-0314',
      role: 'reference',
      excitationNm: EXCITATION_NM,
      solvent: 'ethanol',
      acquiredAt: at('08:40'),
    },
    random,
  );
  const refAbs = absorbanceSpectrum(
    { bandPeakNm: 528, bandWidthNm: 60, excitationNm: EXCITATION_NM, absorbanceAtExcitation: refA },
    { sampleId: 'REF-R6G-0314', role: 'reference', solvent: 'ethanol', acquiredAt: at('08:35') },
    random,
  );
  files.push({ name: 'REF-R6G-0314_em.csv', content: writeSpectrumCsv(refEm) });
  files.push({ name: 'REF-R6G-0314_abs.jdx', content: writeSpectrumJcamp(refAbs) });
  truth.push({ sampleId: 'REF-R6G-0314', role: 'reference', quantumYield: 0.95 });

  // A stand-alone IRF (scatterer), paired with decays that arrive without one.
  const irfSource = decayHistogram(decaySpec(1), { acquiredAt: at('09:05') }, random);
  files.push({
    name: 'irf_0905.csv',
    content: writeDecayCsv(irfAsDecay(irfSource, { sampleId: 'scatter-0905', acquiredAt: at('09:05') })),
  });

  const samples = [
    { id: 'orchid-01', role: 'sample' as const, qy: 0.62, tau: 3.4, a: 0.038, peak: 538, layout: 'canonical' },
    { id: 'orchid-02', role: 'sample' as const, qy: 0.35, tau: 2.1, a: 0.041, peak: 561, layout: 'european' },
    { id: 'CTRL-teal-0314', role: 'control' as const, qy: 0.8, tau: 4.1, a: 0.035, peak: 536, layout: 'manifest' },
  ];
  for (const s of samples) {
    const band = { bandPeakNm: s.peak - 25, bandWidthNm: 55, excitationNm: EXCITATION_NM, absorbanceAtExcitation: s.a };
    const em = emissionSpectrum(
      { peakNm: s.peak, widthNm: 42, integral: emissionIntegralUnattenuated(s.qy, s.a, ETHANOL_N), innerFilter: band },
      {
        ...(s.layout === 'manifest' ? {} : { sampleId: s.id }),
        excitationNm: EXCITATION_NM,
        solvent: 'ethanol',
        acquiredAt: at('10:00'),
      },
      random,
    );
    const abs = absorbanceSpectrum(
      { bandPeakNm: s.peak - 25, bandWidthNm: 55, excitationNm: EXCITATION_NM, absorbanceAtExcitation: s.a },
      { ...(s.layout === 'manifest' ? {} : { sampleId: s.id }), solvent: 'ethanol', acquiredAt: at('09:55') },
      random,
    );
    const decay = decayHistogram(
      decaySpec(s.tau),
      {
        ...(s.layout === 'manifest' ? {} : { sampleId: s.id }),
        excitationNm: 470,
        emissionNm: s.peak,
        acquiredAt: at('10:10'),
      },
      random,
    );
    truth.push({
      sampleId: s.id,
      role: s.role,
      quantumYield: s.qy,
      tauNs: s.tau,
      krPerS: s.qy / (s.tau * 1e-9),
      knrPerS: (1 - s.qy) / (s.tau * 1e-9),
    });
    if (s.layout === 'canonical') {
      files.push({ name: `${s.id}_em.csv`, content: writeSpectrumCsv(em) });
      files.push({ name: `${s.id}_abs.jdx`, content: writeSpectrumJcamp(abs) });
      files.push({ name: `${s.id}_decay.csv`, content: writeDecayCsv(decay) });
    } else if (s.layout === 'european') {
      files.push({
        name: `${s.id}_em.txt`,
        content: europeanText(em, [
          `Sample: ${s.id}`,
          `Excitation [nm]: ${EXCITATION_NM}`,
          'Solvent: ethanol',
          `Date: ${at('10:00')}`,
          'Type: emission',
        ]),
      });
      files.push({
        name: `${s.id}_abs.tsv`,
        content: tabText(abs, [`# sample id: ${s.id}`, '# kind: absorbance', '# path length (cm): 1'], 'absorbance'),
      });
      files.push({ name: `${s.id}_decay.csv`, content: writeDecayCsv(withoutIrf(decay)) });
    } else {
      files.push({ name: 'run0314-a.csv', content: writeSpectrumCsv(em) });
      files.push({ name: 'run0314-b.csv', content: writeSpectrumCsv(abs) });
      files.push({ name: 'run0314-c.csv', content: writeDecayCsv(decay) });
      files.push({
        name: `${s.id}.set.yaml`,
        content: [
          'schema: driftlight.set/1',
          `sampleId: ${s.id}`,
          'role: control',
          'solvent: ethanol',
          `excitationNm: ${EXCITATION_NM}`,
          'files:',
          '  - { file: run0314-a.csv, part: emission }',
          '  - { file: run0314-b.csv, part: absorbance }',
          '  - { file: run0314-c.csv, part: decay }',
          '',
        ].join('\n'),
      });
    }
  }
  // One malformed export: a row with a broken number.
  const broken = writeSpectrumCsv(
    emissionSpectrum(
      { peakNm: 540, widthNm: 40, integral: 1e6 },
      { sampleId: 'orchid-03', excitationNm: EXCITATION_NM },
      random,
    ),
  )
    .split('\n')
    .map((line, i) => (i === 40 ? line.replace(/,.*/, ',12.5.3') : line))
    .join('\n');
  files.push({ name: 'orchid-03_em.csv', content: broken });

  const config = [
    '# driftlight config for the demo day (invented lab: Brightwater teaching bench).',
    '# Folders default to inbox, results, outbox, archive, quarantine and state next to this file; the inbox must',
    '# exist (it does here), the others are created by the first run.',
    'folders: { inbox: inbox }',
    'references:',
    '  - { id: r6g, sampleIdPattern: "^REF-R6G", standardId: rhodamine-6g-ethanol }',
    'controls:',
    '  - { id: teal, sampleIdPattern: "^CTRL-teal", targetYield: 0.8, sdYield: 0.03, targetTauNs: 4.1, sdTauNs: 0.1 }',
    'assembly: { requiredParts: [emission, absorbance, decay, irf] }',
    '',
  ].join('\n');
  return { files, truth, config };
}
