// Reduces an analysis result to the QC observation the rules judge: control yield, lifetime,
// spectral metrics, Raman test and fit quality. Results that are neither a control nor an
// instrument check (water Raman, IRF) give undefined.
import type { AnalysisResult, QcJudgement } from '../analysis/result.js';
import { isControlMatch, selectsMeasurement, type ControlDefinition } from './controls.js';
import type { ControlObservation, MetricName } from './metrics.js';
import { INSTRUMENT_SCOPE } from './rule-base.js';
import { parseIsoToEpochMs } from './time.js';
import { itemAt } from '../model/item-at.js';

/** O–H stretch Raman shift of water in cm⁻¹ (Bartlett et al., Appl. Opt. 37, 3324, 1998). */
export const WATER_RAMAN_SHIFT_PER_CM = 3400;

/** Expected water Raman peak in nm for an excitation wavelength: 1/(1/λex − ν̃/10⁷) (≈ 397 nm at 350 nm). O(1). */
export function expectedWaterRamanPeakNm(excitationNm: number): number {
  return 1 / (1 / excitationNm - WATER_RAMAN_SHIFT_PER_CM * 1e-7);
}

/** Metrics present in a result (absent ones are left out, never NaN). */
export function metricsOfResult(result: AnalysisResult): Partial<Record<MetricName, number>> {
  const metrics: Partial<Record<MetricName, number>> = {};
  const put = (name: MetricName, value: number | undefined): void => {
    if (value !== undefined && Number.isFinite(value)) metrics[name] = value;
  };
  put('controlQuantumYield', result.quantumYield?.value);
  // A lifetime fit marked not acceptable (issue 15.6) is not judged.
  if (result.decayFit?.acceptable !== false) put('meanLifetimeNs', result.decayFit?.tauMeanIntensityNs);
  put('fitChi2Reduced', result.decayFit?.chi2Reduced);
  put('irfWidthNs', result.decayFit?.irfFwhmNs);
  // A correction of the sample emission that was refused (listed in `missing` as "NAME (emission)") leaves the
  // emission metrics uncorrected: they are not judged (issue 15: a quantity that depends on a failed step is missing).
  const emissionCorrectionRefused = result.missing.some((m) => m.what.endsWith(' (emission)'));
  const emission = emissionCorrectionRefused ? undefined : result.spectra.emission;
  const absorbance = result.spectra.absorbance;
  put('peakWavelengthNm', emission?.peakWavelengthNm);
  put('fwhmNm', emission?.fwhmNm);
  put('absorbanceAtExcitation', absorbance?.absorbanceAtExcitation);
  if (emission !== undefined && absorbance !== undefined && absorbance.absorbanceAtExcitation > 0) {
    // Absorptance f = 1 − 10^(−A) at the excitation wavelength (Brouwer, Pure Appl. Chem. 83, 2213, 2011).
    put('intensityPerAbsorbedLight', emission.integratedIntensity / (1 - 10 ** -absorbance.absorbanceAtExcitation));
  }
  if (result.raman !== undefined) {
    put('ramanSnr', result.raman.signalToNoise);
    if (result.excitationNm !== undefined) {
      put('ramanPeakErrorNm', result.raman.peakWavelengthNm - expectedWaterRamanPeakNm(result.excitationNm));
    }
  }
  return metrics;
}

/** A result's QC observation (when judged) and its judgement: which control, which measurement, and why not. */
export interface ResultJudgement {
  readonly observation?: ControlObservation;
  /** Absent when the result is neither a control nor an instrument check. */
  readonly judgement?: QcJudgement;
}

/**
 * Judges whether a result is a QC run (issue 18.3): a control (matched by the rule set's controls; role
 * 'control' with no controls given uses the sample id) or an instrument check (raman/irf role). A file
 * holding several measurements gives one run per control: the measurement its `match.measurement` names,
 * else the file's first; the other measurements, and results without metrics or acquisition time, get a
 * judgement that says they were not judged and why. O(controls).
 */
export function judgeResult(result: AnalysisResult, controls?: readonly ControlDefinition[]): ResultJudgement {
  const column = result.measurement?.column;
  const ownMeasurement = column === undefined ? {} : { measurement: column };
  const candidates =
    controls === undefined ? [] : controls.filter((control) => isControlMatch(control, result.sampleId, result.role));
  let controlId: string;
  let selection: MeasurementSelection;
  if (candidates.length > 0) {
    const chosen = candidates.find((control) => selectsMeasurement(control, result.measurement));
    if (chosen === undefined) {
      const first = itemAt(candidates, 0);
      return {
        judgement: {
          control: first.id,
          judged: false,
          ...ownMeasurement,
          ...selectionOf(first),
          reason: `${candidates.map(describeSelection).join('; ')}; ${describeOwnMeasurement(result)}`,
        },
      };
    }
    controlId = chosen.id;
    selection = selectionOf(chosen);
  } else if (controls === undefined && result.role === 'control') {
    controlId = result.sampleId;
    selection = { selectedBy: 'first' };
  } else if (result.role === 'raman' || result.role === 'irf') {
    controlId = INSTRUMENT_SCOPE;
    selection = { selectedBy: 'first' };
  } else {
    return {};
  }
  if (controlId === INSTRUMENT_SCOPE || candidates.length === 0) {
    // Instrument checks (and controls named by role only) judge a file's first measurement.
    if (result.measurement?.setId !== undefined)
      return {
        judgement: {
          control: controlId,
          judged: false,
          ...ownMeasurement,
          ...selection,
          reason: `${controlId === INSTRUMENT_SCOPE ? 'instrument checks judge' : `control ${controlId} judges`} the first measurement of a file holding several; ${describeOwnMeasurement(result)}`,
        },
      };
  }
  const notJudged = (reason: string): ResultJudgement => ({
    judgement: { control: controlId, judged: false, ...ownMeasurement, ...selection, reason },
  });
  const metrics = metricsOfResult(result);
  const names = Object.keys(metrics);
  if (names.length === 0)
    return notJudged('no QC metric could be computed from this result (see `missing` for what is missing and why)');
  // Judged at its acquisition time only, never the analysis time: the pipeline always records one
  // (the file's modification time when the file carried none, see provenance.acquiredAtSource).
  if (result.acquiredAt === undefined || parseIsoToEpochMs(result.acquiredAt) === undefined)
    return notJudged('the result has no readable acquisition time to place it in the control history');
  return {
    observation: { controlId, setId: result.setId, acquiredAt: result.acquiredAt, metrics, ...ownMeasurement },
    judgement: { control: controlId, judged: true, ...ownMeasurement, ...selection, metrics: names },
  };
}

type MeasurementSelection = Pick<QcJudgement, 'selectedBy' | 'judgedMeasurement'>;

function selectionOf(control: ControlDefinition): MeasurementSelection {
  const named = control.match.measurement;
  return named === undefined ? { selectedBy: 'first' } : { selectedBy: 'config', judgedMeasurement: named };
}

function describeSelection(control: ControlDefinition): string {
  const named = control.match.measurement;
  return named === undefined
    ? `control ${control.id} judges the first measurement of a file holding several`
    : `control ${control.id} judges measurement "${named}" (its config names it)`;
}

function describeOwnMeasurement(result: AnalysisResult): string {
  const measurement = result.measurement;
  if (measurement === undefined)
    return "this result's file holds one measurement, not several to pick the named column from";
  const of = measurement.setId === undefined ? '' : ` (the file's first is result ${measurement.setId})`;
  return `this result is measurement "${measurement.column}", ${measurement.index + 1} of ${measurement.of} in its file${of}`;
}

/**
 * The QC observation of a result: a control (matched by the rule set's controls; role 'control'
 * with no controls given uses the sample id), or an instrument check (raman/irf role); else undefined.
 * A file holding several measurements gives a run for the measurement a control judges only (judgeResult).
 */
export function observationFromResult(
  result: AnalysisResult,
  controls?: readonly ControlDefinition[],
): ControlObservation | undefined {
  return judgeResult(result, controls).observation;
}
