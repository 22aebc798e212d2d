// The seeded two-month control series of issue 16 as instrument files (issue 16, must-show): each day
// a reference standard (rhodamine 6G in ethanol) and the control "teal" (emission CSV + absorbance
// JCAMP-DX each), measured in one session. Injected faults: from day 30 a slow drift of the control
// yield (−0.5 %/day) and of the lamp × detector sensitivity (−1.5 %/day) for 15 days, then from day 45
// a step of the yield to 5 SD below its in-control level that stays; on day 58 the day-10 control is
// exported again (other formats, same measurement). Arrival: day by day, with days held back and
// delivered late in reverse order, the re-export last of its day. Invented data (src/demo/synthetic.ts).
import { writeSpectrumCsv, writeSpectrumJcamp } from '../../src/formats/index.js';
import { absorbanceSpectrum, emissionIntegralFor, emissionSpectrum } from '../../src/demo/synthetic.js';
import { createSeededRandom, sampleStandardNormal } from '../../src/decay/index.js';

/** The series' parameters (the same as test/integration/qc-order-fixtures.ts, where the QC stage alone replays them). */
export const REPLAY = {
  days: 61,
  /** In-control yield of the control and its day-to-day CV (1.5 %, the drift study's CV: docs/qc.md). */
  controlYield: 0.8,
  yieldCvPercent: 1.5,
  /** Day-to-day lamp flicker (CV of the sensitivity, %), common to the reference and control of a day. */
  sensitivityCvPercent: 1,
  driftStartDay: 30,
  driftDays: 15,
  yieldDriftPercentPerDay: -0.5,
  sensitivityDriftPercentPerDay: -1.5,
  stepDay: 45,
  stepSd: -5,
  reexportOfDay: 10,
  reexportArrivesDay: 58,
} as const;

const ETHANOL_N = 1.3618;
const EXCITATION_NM = 480;
export const REFERENCE_YIELD = 0.95; // rhodamine 6G in ethanol as in src/photophysics/standards.ts

/** Emission (CSV) and absorbance (JCAMP-DX) of one measurement, and the same data in the other formats (a re-export). */
export interface MeasuredFiles {
  readonly em: string;
  readonly abs: string;
  readonly emJcamp: string;
  readonly absCsv: string;
}

/** One measurement in ethanol at 480 nm excitation: emission integral ∝ sensitivity · Φ · (1 − 10^−A) / n² (src/demo/synthetic.ts). */
export function measuredFiles(
  spec: {
    sampleId: string;
    acquiredAt: string;
    quantumYield: number;
    absorbance: number;
    peakNm: number;
    bandPeakNm: number;
    sensitivity: number;
  },
  random: ReturnType<typeof createSeededRandom>,
): MeasuredFiles {
  const em = emissionSpectrum(
    {
      peakNm: spec.peakNm,
      widthNm: 38,
      integral: spec.sensitivity * emissionIntegralFor(spec.quantumYield, spec.absorbance, ETHANOL_N),
    },
    { sampleId: spec.sampleId, excitationNm: EXCITATION_NM, solvent: 'ethanol', acquiredAt: spec.acquiredAt },
    random,
  );
  const abs = absorbanceSpectrum(
    {
      bandPeakNm: spec.bandPeakNm,
      bandWidthNm: 60,
      excitationNm: EXCITATION_NM,
      absorbanceAtExcitation: spec.absorbance,
    },
    { sampleId: spec.sampleId, solvent: 'ethanol', acquiredAt: spec.acquiredAt },
    random,
  );
  return {
    em: writeSpectrumCsv(em),
    abs: writeSpectrumJcamp(abs),
    emJcamp: writeSpectrumJcamp(em),
    absCsv: writeSpectrumCsv(abs),
  };
}

/** One file written into the inbox. */
export interface ReplayFile {
  readonly name: string;
  readonly content: string;
}

/** Files that land together at a simulated time (ISO), during scenario day `day`. */
export interface ReplayDelivery {
  readonly day: number;
  readonly arriveAt: string;
  readonly files: readonly ReplayFile[];
}

export interface ReplaySeries {
  readonly deliveries: readonly ReplayDelivery[];
  /** Control sample id of each day (index = day). */
  readonly controlSampleIds: readonly string[];
  /** ISO acquisition time of each day's control. */
  readonly controlAcquiredAt: readonly string[];
  readonly reexportSampleId: string;
}

/** Midnight UTC of day `day` (day 0 = Monday 2 March 2026) plus `hhmm`. */
export function replayTime(day: number, hhmm: string): string {
  const [h, m] = hhmm.split(':').map(Number) as [number, number];
  return new Date(Date.UTC(2026, 2, 2 + day, h, m)).toISOString();
}

function mmdd(day: number): string {
  return replayTime(day, '00:00').slice(5, 10).replace('-', '');
}

/** Days held back and delivered late, each list in the order it arrives, on the day named by the key. */
const LATE: ReadonlyMap<number, readonly number[]> = new Map([
  [15, [14, 13, 12]], // a long weekend's exports copied in on Monday, newest first
  [37, [36, 35]], // during the drift
  [52, [50]], // after the step, one day late, after day 51
]);

/** The seeded series: files per day and their deliveries (in arrival order). */
export function replaySeries(seed = 20261205): ReplaySeries {
  const random = createSeededRandom(seed);
  const sdYield = (REPLAY.controlYield * REPLAY.yieldCvPercent) / 100;
  const perDay: ReplayFile[][] = [];
  const controlSampleIds: string[] = [];
  const controlAcquiredAt: string[] = [];
  let reexport: ReplayFile[] = [];
  for (let day = 0; day < REPLAY.days; day++) {
    const driftDays = Math.min(Math.max(0, day - REPLAY.driftStartDay + 1), REPLAY.driftDays);
    let meanYield = REPLAY.controlYield * (1 + (REPLAY.yieldDriftPercentPerDay / 100) * driftDays);
    if (day >= REPLAY.stepDay) meanYield = REPLAY.controlYield + REPLAY.stepSd * sdYield;
    const controlYield = meanYield + sdYield * sampleStandardNormal(random);
    const sensitivity =
      (1 + (REPLAY.sensitivityDriftPercentPerDay / 100) * driftDays) *
      (1 + (REPLAY.sensitivityCvPercent / 100) * sampleStandardNormal(random));
    const files: ReplayFile[] = [];
    const measure = (
      sampleId: string,
      hhmm: string,
      quantumYield: number,
      absorbance: number,
      peakNm: number,
      bandPeakNm: number,
    ): MeasuredFiles =>
      measuredFiles(
        { sampleId, acquiredAt: replayTime(day, hhmm), quantumYield, absorbance, peakNm, bandPeakNm, sensitivity },
        random,
      );
    const referenceId = `REF-R6G-${mmdd(day)}`;
    const reference = measure(referenceId, '07:50', REFERENCE_YIELD, 0.05, 552, 528);
    files.push(
      { name: `${referenceId}_em.csv`, content: reference.em },
      { name: `${referenceId}_abs.jdx`, content: reference.abs },
    );
    const controlId = `CTRL-teal-${mmdd(day)}`;
    const control = measure(controlId, '08:10', controlYield, 0.05, 540, 516);
    files.push(
      { name: `${controlId}_em.csv`, content: control.em },
      { name: `${controlId}_abs.jdx`, content: control.abs },
    );
    controlSampleIds.push(controlId);
    controlAcquiredAt.push(replayTime(day, '08:10'));
    if (day === REPLAY.reexportOfDay)
      reexport = [
        { name: `${controlId}_em.jdx`, content: control.emJcamp },
        { name: `${controlId}_abs.csv`, content: control.absCsv },
      ];
    perDay.push(files);
  }
  const lateDays = new Set([...LATE.values()].flat());
  const deliveries: ReplayDelivery[] = [];
  for (let day = 0; day < REPLAY.days; day++) {
    for (const late of LATE.get(day) ?? [])
      deliveries.push({ day, arriveAt: replayTime(day, '07:30'), files: perDay[late] ?? [] });
    if (!lateDays.has(day)) deliveries.push({ day, arriveAt: replayTime(day, '08:20'), files: perDay[day] ?? [] });
    if (day === REPLAY.reexportArrivesDay)
      deliveries.push({ day, arriveAt: replayTime(day, '16:30'), files: reexport });
  }
  return {
    deliveries,
    controlSampleIds,
    controlAcquiredAt,
    reexportSampleId: controlSampleIds[REPLAY.reexportOfDay] ?? '',
  };
}
