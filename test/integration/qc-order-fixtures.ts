// A seeded two-month daily control series for the acquisition-order and drift tests (issue 16):
// 30 in-control days, a slow drift of yield (−0.5 %/day) and sensitivity (−1.5 %/day) for 15 days,
// then a step of the yield to 5 SD below target that stays, plus a back-dated re-export of an old run.
import type { AnalysisResult } from '../../src/analysis/result.js';
import { createSeededRandom } from '../../src/qc/index.js';

/** Declared yield target and SD of the control (1.5 % CV, a common day-to-day spread; assumption). */
export const SERIES = {
  targetYield: 0.8,
  sdYield: 0.012,
  intensityPerAbsorbedLight: 2.0e7,
  intensityCvPercent: 1,
  absorbanceAtExcitation: 0.05,
  inControlDays: 30,
  driftDays: 15,
  yieldDriftPercentPerDay: -0.5,
  sensitivityDriftPercentPerDay: -1.5,
  stepSd: -5,
  days: 61,
} as const;

/** The 3-line README control, as driftlight.yaml defines it. */
export const SERIES_CONTROL = {
  id: 'teal',
  sampleIdPattern: '^CTRL-teal',
  targetYield: SERIES.targetYield,
  sdYield: SERIES.sdYield,
  baselineRuns: 20,
};

/** ISO acquisition time of series day `day` (day 0 = Monday 2 March 2026, 08:00 UTC). */
export function seriesDayIso(day: number): string {
  return new Date(Date.UTC(2026, 2, 2 + day, 8)).toISOString();
}

/** One control result as the pipeline would produce it (yield, emission integral, absorbance). */
function controlRunResult(
  setId: string,
  acquiredAt: string,
  quantumYield: number,
  intensityPerAbsorbedLight: number,
): AnalysisResult {
  const absorptance = 1 - 10 ** -SERIES.absorbanceAtExcitation;
  return {
    schema: 'driftlight.result/1',
    setId,
    role: 'control',
    sampleId: `CTRL-teal-${acquiredAt.slice(0, 10)}`,
    acquiredAt,
    partial: false,
    missing: [],
    spectra: {
      emission: {
        peakWavelengthNm: 515,
        peakValue: 1,
        integratedIntensity: intensityPerAbsorbedLight * absorptance,
        fwhmNm: 35,
        valueUnit: 'counts',
        rangeNm: [490, 650],
      },
      absorbance: {
        absorbanceAtExcitation: SERIES.absorbanceAtExcitation,
        excitationNm: 480,
        peakWavelengthNm: 490,
        peakAbsorbance: 0.06,
      },
    },
    corrections: [],
    quantumYield: {
      value: quantumYield,
      standardUncertainty: 0.01,
      budget: [],
      standardId: 'rhodamine-6g-ethanol',
      warnings: [],
    },
    warnings: [],
    qc: { flags: [] },
    provenance: { inputs: [], configHash: 'test', softwareVersion: '0.1.0', corrections: [], analyzedAt: acquiredAt },
  };
}

/** Day index at which the drift starts, and at which the step happens. */
export const DRIFT_START_DAY = SERIES.inControlDays;
export const STEP_DAY = SERIES.inControlDays + SERIES.driftDays;

/** The series (seeded), in acquisition order, with a re-export of day 10 (same time, new set id) last. */
export function controlSeries(seed: number): AnalysisResult[] {
  const random = createSeededRandom(seed);
  const results: AnalysisResult[] = [];
  for (let day = 0; day < SERIES.days; day++) {
    const driftDays = Math.min(Math.max(0, day - DRIFT_START_DAY + 1), SERIES.driftDays);
    let meanYield = SERIES.targetYield * (1 + (SERIES.yieldDriftPercentPerDay / 100) * driftDays);
    if (day >= STEP_DAY) meanYield = SERIES.targetYield + SERIES.stepSd * SERIES.sdYield;
    const meanIntensity =
      SERIES.intensityPerAbsorbedLight * (1 + (SERIES.sensitivityDriftPercentPerDay / 100) * driftDays);
    const quantumYield = meanYield + SERIES.sdYield * random.standardNormal();
    const intensity = meanIntensity * (1 + (SERIES.intensityCvPercent / 100) * random.standardNormal());
    results.push(
      controlRunResult(`ctrl-${seriesDayIso(day).slice(0, 10)}`, seriesDayIso(day), quantumYield, intensity),
    );
  }
  const old = results[10];
  if (old === undefined) throw new Error('series too short');
  results.push({ ...old, setId: `ctrl-reexport-${seriesDayIso(10).slice(0, 10)}` });
  return results;
}

/** A seeded permutation (Fisher–Yates). */
export function shuffled<T>(items: readonly T[], seed: number): T[] {
  const random = createSeededRandom(seed);
  const copy = [...items];
  for (let index = copy.length - 1; index > 0; index--) {
    const other = Math.floor(random.uniform() * (index + 1));
    [copy[index], copy[other]] = [copy[other] as T, copy[index] as T];
  }
  return copy;
}
