// Reduces an analysis result to the QC observation the rules judge: control yield, lifetime,
// spectral metrics, Raman test and fit quality. Results that are neither a control nor an
// instrument check (water Raman, IRF) give undefined.
import type { AnalysisResult } from '../analysis/result.js';
import { findControl, type ControlDefinition } from './controls.js';
import type { ControlObservation, MetricName } from './metrics.js';
import { INSTRUMENT_SCOPE } from './rule-base.js';
import { parseIsoToEpochMs } from './time.js';

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

/**
 * The QC observation of a result: a control (matched by the rule set's controls; role 'control'
 * with no controls given uses the sample id), or an instrument check (raman/irf role); else undefined.
 */
export function observationFromResult(
  result: AnalysisResult,
  controls?: readonly ControlDefinition[],
): ControlObservation | undefined {
  const control = controls === undefined ? undefined : findControl(controls, result.sampleId, result.role);
  let controlId: string | undefined = control?.id;
  if (controlId === undefined && controls === undefined && result.role === 'control') controlId = result.sampleId;
  if (controlId === undefined && (result.role === 'raman' || result.role === 'irf')) controlId = INSTRUMENT_SCOPE;
  if (controlId === undefined) return undefined;
  const metrics = metricsOfResult(result);
  if (Object.keys(metrics).length === 0) return undefined;
  // Judged at its acquisition time only, never the analysis time: the pipeline always records one
  // (the file's modification time when the file carried none, see provenance.acquiredAtSource).
  if (result.acquiredAt === undefined || parseIsoToEpochMs(result.acquiredAt) === undefined) return undefined;
  return { controlId, setId: result.setId, acquiredAt: result.acquiredAt, metrics };
}
