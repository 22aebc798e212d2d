// The demo month (invented): thirty days of exports from the fictional "Quillmere probe-development
// lab" — one fluorometer and a TCSPC module — with faults injected on known days. Pure and seeded:
// the same seed gives the same files, arrival times and truth. `driftlight demo` replays it through
// the watch path; test/integration/demo-month.test.ts checks the alerts against `truth`.
import { writeDecayCsv, writeSpectrumCsv, writeSpectrumJcamp } from '../formats/index.js';
import { createSpectrum, type Spectrum } from '../model/spectrum.js';
import { createDecay, type Decay } from '../model/decay.js';
import { createSeededRandom, samplePoisson, sampleStandardNormal, type UniformSource } from '../decay/index.js';
import {
  absorbanceSpectrum,
  decayHistogram,
  emissionIntegralUnattenuated,
  irfAsDecay,
  withoutIrf,
} from './synthetic.js';
import type { DemoFile } from './scenario.js';
import { monthConfig, monthRules } from './month-config.js';
import { decayJson, europeanText, tabText, tcspcScriptText, twoWavelengthDecayCsv } from './month-layouts.js';

/** Number of days in the scenario. */
export const MONTH_DAYS = 30;
/** Day 1 of the scenario (a Monday). */
export const MONTH_START_DATE = '2026-02-02';

/** One file and the simulated moment it lands in the inbox. */
export interface MonthArrival {
  /** Scenario day, 1..30. */
  readonly day: number;
  /** Simulated arrival time, ISO 8601 UTC. */
  readonly arriveAt: string;
  readonly file: DemoFile;
}

/** An injected instrument or sample fault and the alert the QC rules are expected to raise. */
export interface MonthFault {
  readonly id: 'sensitivity-loss' | 'contaminated-control' | 'irf-broadening';
  readonly description: string;
  /** First scenario day the fault affects. */
  readonly fromDay: number;
  /** Rule ids of which at least one must alert (warning or critical). */
  readonly expectedRules: readonly string[];
  /** The alert must come at the latest on fromDay + withinDays. */
  readonly withinDays: number;
}

/** The daily control as generated (before any instrument effect on the numbers the pipeline computes). */
export interface MonthControlTruth {
  readonly day: number;
  readonly sampleId: string;
  readonly acquiredAt: string;
  readonly quantumYield: number;
  readonly tauNs: number;
  /** Relative lamp × detector sensitivity that day (1 = nominal). */
  readonly sensitivity: number;
  readonly irfFwhmNs: number;
  readonly contaminated: boolean;
}

export interface MonthTruth {
  readonly lab: string;
  readonly faults: readonly MonthFault[];
  readonly controls: readonly MonthControlTruth[];
  /** Days before the first fault: no critical alert expected. */
  readonly inControlDays: readonly number[];
  readonly malformed: { readonly day: number; readonly file: string; readonly code: string };
  readonly missingIrf: { readonly day: number; readonly sampleId: string; readonly file: string };
  readonly lateReExport: {
    readonly sampleId: string;
    readonly acquiredDay: number;
    readonly arrivesDay: number;
    readonly files: readonly string[];
  };
  readonly europeanDate: {
    readonly day: number;
    readonly file: string;
    readonly written: string;
    readonly acquiredAt: string;
  };
  readonly quenching: {
    readonly day: number;
    readonly sampleIds: readonly string[];
    readonly quencherMolar: readonly number[];
    readonly kqPerMPerS: number;
    readonly tau0Ns: number;
  };
  readonly samples: readonly {
    readonly sampleId: string;
    readonly day: number;
    readonly quantumYield: number;
    readonly tauNs: number;
  }[];
  /** Samples whose decay file holds two count columns (two emission wavelengths, one lifetime): each column gives its own result. */
  readonly twoColumnDecays: readonly {
    readonly sampleId: string;
    readonly file: string;
    readonly columns: readonly string[];
    readonly tauNs: number;
  }[];
}

export interface DemoMonth {
  /** driftlight.yaml for the workspace; `{{WEBHOOK_URL}}` is replaced by the demo with its receiver. */
  readonly config: string;
  /** The rule set file (rules.yaml) the config names. */
  readonly rules: string;
  /** Every file in arrival order. */
  readonly arrivals: readonly MonthArrival[];
  readonly truth: MonthTruth;
}

const LAB = 'Quillmere probe-development lab (invented)';
const ETHANOL_N = 1.3618;
const EXCITATION_NM = 480;
const CONTROL = { quantumYield: 0.71, tauNs: 3.9, absorbance: 0.042, peakNm: 540, widthNm: 36 };
const REFERENCE = { quantumYield: 0.95, absorbance: 0.045, peakNm: 552, widthNm: 38, bandPeakNm: 528 };
const SENSITIVITY_LOSS_PER_DAY = 0.03;
const CONTAMINATION_FACTOR = 0.8;
const IRF_FWHM_NS = 0.2;
const IRF_FWHM_AFTER_ALIGNMENT_NS = 0.45;
const DARK_COUNTS = 20;
const CHANNELS = 512;
const CHANNEL_WIDTH_NS = 0.05;

/** ISO date (YYYY-MM-DD) of scenario `day` (1-based). */
export function monthDate(day: number): string {
  const start = Date.parse(`${MONTH_START_DATE}T00:00:00Z`);
  return new Date(start + (day - 1) * 86_400_000).toISOString().slice(0, 10);
}

/** MMDD tag used in sample ids. */
function tag(day: number): string {
  return monthDate(day).slice(5).replace('-', '');
}

/** Lamp × detector sensitivity on `day`: 1 before day 17, then falling by 3 % a day. */
function sensitivityOn(day: number): number {
  return day < 17 ? 1 : 1 - SENSITIVITY_LOSS_PER_DAY * (day - 16);
}

/** Poisson-sampled Gaussian emission band on a dark level; `integral` is the unattenuated band's (counts·nm). */
function emissionCounts(
  spec: {
    peakNm: number;
    widthNm: number;
    integral: number;
    absorbanceAtExcitation: number;
    bandPeakNm: number;
    bandWidthNm: number;
    fromNm?: number;
    toNm?: number;
  },
  metadata: Spectrum['metadata'] | Record<string, unknown>,
  random: UniformSource,
): Spectrum {
  const fromNm = spec.fromNm ?? 490;
  const toNm = spec.toNm ?? 720;
  const wavelengthNm = Float64Array.from({ length: toNm - fromNm + 1 }, (_u, i) => fromNm + i);
  const sigma = spec.widthNm / (2 * Math.sqrt(2 * Math.log(2)));
  const peak = spec.integral / (sigma * Math.sqrt(2 * Math.PI));
  const absSigma = spec.bandWidthNm / (2 * Math.sqrt(2 * Math.log(2)));
  const absShape = (nm: number): number => Math.exp(-((nm - spec.bandPeakNm) ** 2) / (2 * absSigma * absSigma));
  const absPeak = spec.absorbanceAtExcitation / absShape(EXCITATION_NM);
  // Centred right-angle inner filter 10^(−(A_ex + A_em(λ))/2) (Lakowicz, 3rd ed., ch. 2).
  const values = Float64Array.from(wavelengthNm, (nm) => {
    const attenuation = 10 ** (-(spec.absorbanceAtExcitation + absPeak * absShape(nm)) / 2);
    const mean = peak * attenuation * Math.exp(-((nm - spec.peakNm) ** 2) / (2 * sigma * sigma)) + DARK_COUNTS;
    return samplePoisson(mean, random);
  });
  return createSpectrum({
    kind: 'emission',
    wavelengthNm,
    values,
    valueUnit: 'counts',
    valueColumn: 'intensity',
    metadata: { ...metadata, extra: {} },
  });
}

/** Solvent blank: dark counts plus the weak ethanol C–H Raman band (≈ 2930 cm⁻¹ → 556 nm at 480 nm excitation). */
function blankCounts(sensitivity: number, metadata: Record<string, unknown>, random: UniformSource): Spectrum {
  const wavelengthNm = Float64Array.from({ length: 231 }, (_u, i) => 490 + i);
  const ramanNm = 1 / (1 / EXCITATION_NM - 2930e-7);
  const values = Float64Array.from(wavelengthNm, (nm) =>
    samplePoisson(DARK_COUNTS + sensitivity * 60 * Math.exp(-((nm - ramanNm) ** 2) / (2 * 4 * 4)), random),
  );
  return createSpectrum({
    kind: 'emission',
    wavelengthNm,
    values,
    valueUnit: 'counts',
    valueColumn: 'intensity',
    metadata: { extra: {}, role: 'blank', ...metadata },
  });
}

/** Water Raman scan at 350 nm excitation (O–H band at 3400 cm⁻¹ → 397 nm; Bartlett et al. 1998). */
function waterRaman(sensitivity: number, metadata: Record<string, unknown>, random: UniformSource): Spectrum {
  const wavelengthNm = Float64Array.from({ length: 221 }, (_u, i) => 365 + i * 0.5);
  const peakNm = 1 / (1 / 350 - 3400e-7);
  const values = Float64Array.from(wavelengthNm, (nm) =>
    samplePoisson(40 + sensitivity * 30_000 * Math.exp(-((nm - peakNm) ** 2) / (2 * 3.5 * 3.5)), random),
  );
  return createSpectrum({
    kind: 'emission',
    wavelengthNm,
    values,
    valueUnit: 'counts',
    valueColumn: 'intensity',
    metadata: { extra: {}, role: 'raman', excitationNm: 350, solvent: 'water', ...metadata },
  });
}

/** A decay with its IRF replaced (a different IRF recorded alongside). */
function withIrf(decay: Decay, irfCounts: Float64Array): Decay {
  return createDecay({
    timeNs: decay.timeNs,
    counts: decay.counts,
    channelWidthNs: decay.channelWidthNs,
    irfCounts,
    metadata: decay.metadata,
  });
}

interface MeasuredSample {
  readonly em: Spectrum;
  readonly abs: Spectrum;
  readonly decay: Decay;
}

/** Emission, absorbance and decay (with IRF column) of one sample in ethanol at 480 nm excitation. */
function measure(
  s: {
    sampleId: string | undefined;
    quantumYield: number;
    tauNs: number;
    absorbance: number;
    peakNm: number;
    widthNm: number;
    photons: number;
    role?: 'control' | 'sample';
  },
  day: number,
  hhmm: string,
  sensitivity: number,
  irfFwhmNs: number,
  random: UniformSource,
): MeasuredSample {
  const at = `${monthDate(day)}T${hhmm}:00Z`;
  const id = s.sampleId === undefined ? {} : { sampleId: s.sampleId };
  const band = {
    bandPeakNm: s.peakNm - 24,
    bandWidthNm: 70,
    excitationNm: EXCITATION_NM,
    absorbanceAtExcitation: s.absorbance,
  };
  const integral = sensitivity * emissionIntegralUnattenuated(s.quantumYield, s.absorbance, ETHANOL_N);
  const em = emissionCounts(
    {
      peakNm: s.peakNm,
      widthNm: s.widthNm,
      integral,
      absorbanceAtExcitation: s.absorbance,
      bandPeakNm: band.bandPeakNm,
      bandWidthNm: band.bandWidthNm,
    },
    { ...id, excitationNm: EXCITATION_NM, solvent: 'ethanol', acquiredAt: at },
    random,
  );
  const abs = absorbanceSpectrum(band, { ...id, solvent: 'ethanol', acquiredAt: at }, random);
  const decay = decayHistogram(
    { tauNs: [s.tauNs], photons: s.photons, channels: CHANNELS, channelWidthNs: CHANNEL_WIDTH_NS, irfFwhmNs },
    { ...id, excitationNm: 470, emissionNm: s.peakNm, repetitionRateHz: 20e6, countRatePerS: 2e5, acquiredAt: at },
    random,
  );
  return { em, abs, decay };
}

function hhmmPlus(hhmm: string, minutes: number): string {
  const [h, m] = hhmm.split(':').map(Number) as [number, number];
  const total = h * 60 + m + minutes;
  return `${String(Math.floor(total / 60)).padStart(2, '0')}:${String(total % 60).padStart(2, '0')}`;
}

/** Generates the month (config, rule set, files in arrival order, truth) from `seed`. */
export function generateDemoMonth(seed = 20260202): DemoMonth {
  const random = createSeededRandom(seed);
  const arrivals: MonthArrival[] = [];
  const controls: MonthControlTruth[] = [];
  const samples: { sampleId: string; day: number; quantumYield: number; tauNs: number }[] = [];
  const twoColumnDecays: { sampleId: string; file: string; columns: string[]; tauNs: number }[] = [];
  const arrive = (day: number, hhmm: string, name: string, content: string): void => {
    arrivals.push({ day, arriveAt: `${monthDate(day)}T${hhmm}:00Z`, file: { name, content } });
  };
  const controlFiles = new Map<number, MeasuredSample & { irf: Decay }>();
  const quenchIds: string[] = [];
  const quencherMolar = [0, 0.01, 0.02, 0.04, 0.08];
  const kqPerMPerS = 5e9;
  const probeTau0Ns = 3.2;
  const probeYield0 = 0.55;
  let malformed: MonthTruth['malformed'] | undefined;
  let missingIrf: MonthTruth['missingIrf'] | undefined;
  let europeanDate: MonthTruth['europeanDate'] | undefined;
  const reExportFiles: string[] = [];

  for (let day = 1; day <= MONTH_DAYS; day++) {
    const t = tag(day);
    // Day-to-day lamp flicker between sessions (±0.8 %), on top of the slow loss from day 17.
    const sensitivity = sensitivityOn(day) * (1 + 0.008 * sampleStandardNormal(random));
    const irfFwhmNs = day >= 27 ? IRF_FWHM_AFTER_ALIGNMENT_NS : IRF_FWHM_NS;

    // Weekly reference standard (rhodamine 6G in ethanol), Mondays, before the control.
    if ((day - 1) % 7 === 0) {
      const week = (day - 1) / 7 + 1;
      const id = `REF-R6G-wk${week}`;
      const at = `${monthDate(day)}T07:50:00Z`;
      const em = emissionCounts(
        {
          peakNm: REFERENCE.peakNm,
          widthNm: REFERENCE.widthNm,
          integral: sensitivity * emissionIntegralUnattenuated(REFERENCE.quantumYield, REFERENCE.absorbance, ETHANOL_N),
          absorbanceAtExcitation: REFERENCE.absorbance,
          bandPeakNm: REFERENCE.bandPeakNm,
          bandWidthNm: 60,
        },
        { sampleId: id, excitationNm: EXCITATION_NM, solvent: 'ethanol', acquiredAt: at },
        random,
      );
      const abs = absorbanceSpectrum(
        {
          bandPeakNm: REFERENCE.bandPeakNm,
          bandWidthNm: 60,
          excitationNm: EXCITATION_NM,
          absorbanceAtExcitation: REFERENCE.absorbance,
        },
        { sampleId: id, solvent: 'ethanol', acquiredAt: at },
        random,
      );
      arrive(
        day,
        '07:55',
        `${id}_em.txt`,
        europeanText(em, [
          `Sample: ${id}`,
          `Excitation [nm]: ${EXCITATION_NM}`,
          'Solvent: ethanol',
          `Date: ${at}`,
          'Type: emission',
        ]),
      );
      arrive(day, '07:56', `${id}_abs.jdx`, writeSpectrumJcamp(abs));
    }

    // Daily solvent blank (ethanol).
    const blank = blankCounts(
      sensitivity,
      { excitationNm: EXCITATION_NM, solvent: 'ethanol', acquiredAt: `${monthDate(day)}T07:58:00Z` },
      random,
    );
    arrive(day, '08:00', `blank_${t}_etoh.csv`, writeSpectrumCsv(blank));

    // Daily control dye: emission (CSV), absorbance (JCAMP-DX), decay and its own IRF file.
    const contaminated = day >= 24;
    const controlYield = CONTROL.quantumYield * (contaminated ? CONTAMINATION_FACTOR : 1);
    const controlTau = CONTROL.tauNs * (contaminated ? CONTAMINATION_FACTOR : 1) + 0.01 * sampleStandardNormal(random);
    const controlId = `CTRL-QL-${t}`;
    const c = measure(
      {
        sampleId: controlId,
        quantumYield: controlYield,
        tauNs: controlTau,
        absorbance: CONTROL.absorbance * (1 + 0.03 * sampleStandardNormal(random)),
        peakNm: CONTROL.peakNm,
        widthNm: CONTROL.widthNm,
        photons: 300_000,
      },
      day,
      '08:10',
      sensitivity,
      irfFwhmNs,
      random,
    );
    const irf = irfAsDecay(c.decay, { sampleId: controlId, acquiredAt: `${monthDate(day)}T08:12:00Z` });
    controlFiles.set(day, { ...c, irf });
    controls.push({
      day,
      sampleId: controlId,
      acquiredAt: `${monthDate(day)}T08:10:00Z`,
      quantumYield: controlYield,
      tauNs: controlTau,
      sensitivity,
      irfFwhmNs,
      contaminated,
    });
    arrive(day, '08:15', `${controlId}_em.csv`, writeSpectrumCsv(c.em));
    arrive(day, '08:15', `${controlId}_abs.jdx`, writeSpectrumJcamp(c.abs));
    arrive(day, '08:16', `${controlId}_decay.csv`, writeDecayCsv(withoutIrf(c.decay)));
    arrive(day, '08:16', `${controlId}_irf.csv`, writeDecayCsv(irf));

    // Weekly water Raman scan (Wednesdays).
    if ((day - 3) % 7 === 0) {
      const scan = waterRaman(
        sensitivity,
        { sampleId: `water-raman-${t}`, acquiredAt: `${monthDate(day)}T08:30:00Z` },
        random,
      );
      arrive(day, '08:35', `water-${t}_raman.csv`, writeSpectrumCsv(scan));
    }

    // Samples: two probes a day, in rotating layouts.
    for (let n = 1; n <= 2; n++) {
      const sampleId = `probe-${String.fromCharCode(64 + ((day + n) % 6) + 1)}-${t}-${n}`;
      const quantumYield = Number((0.2 + 0.6 * random.nextUniform()).toFixed(3));
      const tauNs = Number((1.5 + 3 * random.nextUniform()).toFixed(2));
      const hhmm = n === 1 ? '10:30' : '13:45';
      const layout = (day + n) % 3;
      const isEuropeanDated = day === 14 && n === 2;
      const absorbance = 0.03 + 0.03 * random.nextUniform();
      const peakNm = 540 + Math.round(15 * random.nextUniform());
      const m = measure(
        {
          sampleId: layout === 2 ? undefined : sampleId,
          quantumYield,
          tauNs,
          absorbance,
          peakNm,
          widthNm: 40,
          photons: 200_000,
        },
        day,
        hhmm,
        sensitivity,
        irfFwhmNs,
        random,
      );
      samples.push({ sampleId, day, quantumYield, tauNs });
      const arriveAt = hhmmPlus(hhmm, 10);
      if (isEuropeanDated) {
        // One export written with a European day-first date (15.02.2026 13:45 = 15 February).
        const written = `${monthDate(day).slice(8, 10)}.${monthDate(day).slice(5, 7)}.${monthDate(day).slice(0, 4)} ${hhmm}`;
        const name = `${sampleId}_em.txt`;
        arrive(
          day,
          arriveAt,
          name,
          europeanText(m.em, [
            `Sample: ${sampleId}`,
            `Excitation [nm]: ${EXCITATION_NM}`,
            'Solvent: ethanol',
            `Date: ${written}`,
            'Type: emission',
          ]),
        );
        arrive(
          day,
          arriveAt,
          `${sampleId}_abs.tsv`,
          tabText(m.abs, [`sample id: ${sampleId}`, 'kind: absorbance', 'path length (cm): 1'], 'absorbance'),
        );
        arrive(day, arriveAt, `${sampleId}_decay.json`, decayJson(m.decay));
        europeanDate = { day, file: name, written, acquiredAt: `${monthDate(day)}T${hhmm}:00Z` };
      } else if (layout === 0 && n === 2) {
        // The afternoon probe's decay at the band's peak and at its red edge, in one file.
        // Its own generator, so the rest of the month draws the same numbers as without this file.
        const redEdge = decayHistogram(
          { tauNs: [tauNs], photons: 100_000, channels: CHANNELS, channelWidthNs: CHANNEL_WIDTH_NS, irfFwhmNs },
          { sampleId },
          createSeededRandom(seed + day),
        );
        const name = `${sampleId}_decay.csv`;
        const columns = [`counts at ${peakNm} nm`, `counts at ${peakNm + 40} nm`];
        arrive(day, arriveAt, `${sampleId}_em.csv`, writeSpectrumCsv(m.em));
        arrive(day, arriveAt, `${sampleId}_abs.jdx`, writeSpectrumJcamp(m.abs));
        arrive(day, arriveAt, name, twoWavelengthDecayCsv(m.decay, redEdge, peakNm, peakNm + 40));
        twoColumnDecays.push({ sampleId, file: name, columns, tauNs });
      } else if (layout === 0) {
        arrive(day, arriveAt, `${sampleId}_em.csv`, writeSpectrumCsv(m.em));
        arrive(day, arriveAt, `${sampleId}_abs.jdx`, writeSpectrumJcamp(m.abs));
        arrive(day, arriveAt, `${sampleId}_decay.csv`, writeDecayCsv(m.decay));
      } else if (layout === 1) {
        arrive(
          day,
          arriveAt,
          `${sampleId}_em.txt`,
          europeanText(m.em, [
            `Sample: ${sampleId}`,
            `Excitation [nm]: ${EXCITATION_NM}`,
            'Solvent: ethanol',
            `Date: ${m.em.metadata.acquiredAt ?? ''}`,
            'Type: emission',
          ]),
        );
        arrive(
          day,
          arriveAt,
          `${sampleId}_abs.tsv`,
          tabText(m.abs, [`sample id: ${sampleId}`, 'kind: absorbance', 'path length (cm): 1'], 'absorbance'),
        );
        // The decay from the lab's own TCSPC script: read through the config's instrument profile.
        arrive(day, arriveAt, `${sampleId}_tcspc.txt`, tcspcScriptText(m.decay));
      } else {
        // Opaque instrument file names, grouped by a set manifest.
        const stem = `run${t}-${n}`;
        arrive(day, arriveAt, `${stem}a.csv`, writeSpectrumCsv(m.em));
        arrive(day, arriveAt, `${stem}b.csv`, writeSpectrumCsv(m.abs));
        arrive(day, arriveAt, `${stem}c.csv`, writeDecayCsv(m.decay));
        arrive(
          day,
          hhmmPlus(arriveAt, 1),
          `${sampleId}.set.yaml`,
          [
            'schema: driftlight.set/1',
            `sampleId: ${sampleId}`,
            'role: sample',
            'solvent: ethanol',
            `excitationNm: ${EXCITATION_NM}`,
            'files:',
            `  - { file: ${stem}a.csv, part: emission }`,
            `  - { file: ${stem}b.csv, part: absorbance }`,
            `  - { file: ${stem}c.csv, part: decay }`,
            '',
          ].join('\n'),
        );
      }
    }

    // A quenching series on day 12: one probe with 0–80 mM quencher (dynamic quenching, Stern–Volmer).
    if (day === 12) {
      quencherMolar.forEach((molar, i) => {
        const factor = 1 + kqPerMPerS * probeTau0Ns * 1e-9 * molar;
        const sampleId = `quench-P7-${String(Math.round(molar * 1000)).padStart(2, '0')}mM`;
        quenchIds.push(sampleId);
        const hhmm = hhmmPlus('15:00', 12 * i);
        const m = measure(
          {
            sampleId,
            quantumYield: probeYield0 / factor,
            tauNs: probeTau0Ns / factor,
            absorbance: 0.04,
            peakNm: 548,
            widthNm: 40,
            photons: 200_000,
          },
          day,
          hhmm,
          sensitivity,
          irfFwhmNs,
          random,
        );
        samples.push({ sampleId, day, quantumYield: probeYield0 / factor, tauNs: probeTau0Ns / factor });
        arrive(day, hhmmPlus(hhmm, 8), `${sampleId}_em.csv`, writeSpectrumCsv(m.em));
        arrive(day, hhmmPlus(hhmm, 8), `${sampleId}_abs.jdx`, writeSpectrumJcamp(m.abs));
        arrive(day, hhmmPlus(hhmm, 9), `${sampleId}_decay.csv`, writeDecayCsv(m.decay));
      });
    }

    // Day 6: an export that broke off mid-write on the instrument PC (a number with two decimal points).
    if (day === 6) {
      const m = measure(
        {
          sampleId: `probe-X-${t}-3`,
          quantumYield: 0.4,
          tauNs: 2.5,
          absorbance: 0.04,
          peakNm: 545,
          widthNm: 40,
          photons: 100_000,
        },
        day,
        '16:00',
        sensitivity,
        irfFwhmNs,
        random,
      );
      const name = `probe-X-${t}-3_em.csv`;
      const broken = writeSpectrumCsv(m.em)
        .split('\n')
        .map((line, i) => (i === 40 ? line.replace(/,.*/, ',12.5.3') : line))
        .join('\n');
      arrive(day, '16:05', name, broken);
      malformed = { day, file: name, code: 'NON_NUMERIC' };
    }

    // Day 13: an evening decay measured without an IRF, and none recorded within the IRF validity window.
    if (day === 13) {
      const sampleId = `probe-late-${t}`;
      const m = measure(
        { sampleId, quantumYield: 0.48, tauNs: 2.8, absorbance: 0.04, peakNm: 550, widthNm: 40, photons: 200_000 },
        day,
        '19:40',
        sensitivity,
        irfFwhmNs,
        random,
      );
      samples.push({ sampleId, day, quantumYield: 0.48, tauNs: 2.8 });
      arrive(day, '19:45', `${sampleId}_em.csv`, writeSpectrumCsv(m.em));
      arrive(day, '19:45', `${sampleId}_abs.jdx`, writeSpectrumJcamp(m.abs));
      arrive(day, '19:46', `${sampleId}_decay.csv`, writeDecayCsv(withoutIrf(m.decay)));
      missingIrf = { day, sampleId, file: `${sampleId}_decay.csv` };
    }

    // Day 25, afternoon: the day-22 control is exported again (another layout, same measurement).
    if (day === 25) {
      const old = controlFiles.get(22);
      if (old === undefined) throw new Error('the day-22 control was not generated');
      const id = `CTRL-QL-${tag(22)}`;
      const files = [
        {
          name: `${id}_em.txt`,
          content: europeanText(old.em, [
            `Sample: ${id}`,
            `Excitation [nm]: ${EXCITATION_NM}`,
            'Solvent: ethanol',
            `Date: ${old.em.metadata.acquiredAt ?? ''}`,
            'Type: emission',
          ]),
        },
        {
          name: `${id}_abs.tsv`,
          content: tabText(
            old.abs,
            [
              `sample id: ${id}`,
              'kind: absorbance',
              'path length (cm): 1',
              `acquired at: ${old.abs.metadata.acquiredAt ?? ''}`,
            ],
            'absorbance',
          ),
        },
        {
          name: `${id}_decay.json`,
          content: decayJson(withIrf(withoutIrf(old.decay), Float64Array.from(old.irf.counts))),
        },
      ];
      for (const f of files) arrive(day, '16:30', f.name, f.content);
      reExportFiles.push(...files.map((f) => f.name));
    }
  }
  if (malformed === undefined || missingIrf === undefined || europeanDate === undefined)
    throw new Error('scenario incomplete');

  const truth: MonthTruth = {
    lab: LAB,
    faults: [
      {
        id: 'sensitivity-loss',
        description: 'lamp/detector sensitivity falls 3 % a day from day 17',
        fromDay: 17,
        expectedRules: ['yield-ewma', 'yield-cusum', 'yield-westgard', 'intensity-change'],
        withinDays: 5,
      },
      {
        id: 'contaminated-control',
        description: `control stock contaminated from day 24: yield and lifetime × ${CONTAMINATION_FACTOR}`,
        fromDay: 24,
        expectedRules: ['yield-westgard', 'lifetime-westgard'],
        withinDays: 0,
      },
      {
        id: 'irf-broadening',
        description: `IRF FWHM ${IRF_FWHM_NS} → ${IRF_FWHM_AFTER_ALIGNMENT_NS} ns after an alignment change on day 27`,
        fromDay: 27,
        expectedRules: ['irf-width'],
        withinDays: 0,
      },
    ],
    controls,
    inControlDays: Array.from({ length: 16 }, (_u, i) => i + 1),
    malformed,
    missingIrf,
    lateReExport: { sampleId: `CTRL-QL-${tag(22)}`, acquiredDay: 22, arrivesDay: 25, files: reExportFiles },
    europeanDate,
    quenching: { day: 12, sampleIds: quenchIds, quencherMolar, kqPerMPerS, tau0Ns: probeTau0Ns },
    samples,
    twoColumnDecays,
  };
  arrivals.sort((a, b) => (a.arriveAt < b.arriveAt ? -1 : a.arriveAt > b.arriveAt ? 1 : 0));
  return { config: monthConfig(LAB, CONTROL, CHANNEL_WIDTH_NS), rules: monthRules(LAB), arrivals, truth };
}
