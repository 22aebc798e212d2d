// Corrects an emission spectrum (blank, detector curve, inner filter, in that order) and summarises
// it and its absorbance spectrum.
import type { Spectrum } from '../model/spectrum.js';
import {
  applyDetectorCorrection,
  correctInnerFilter,
  interpolateAt,
  spectrumMetrics,
  subtractBlank,
  type CorrectionResult,
} from '../spectra/index.js';
import type { AnalysisSettings } from './payload.js';
import type { AbsorbanceSummary, AppliedCorrection, EmissionMetrics } from './result.js';
import { markMissing, reasonOf, type StepContext } from './step-context.js';
import { itemAt } from '../model/item-at.js';

export interface CorrectedEmission {
  /** After every correction that could be applied. */
  readonly corrected: Spectrum;
  /** Names of the corrections applied to `corrected`, in order. */
  readonly applied: readonly string[];
  /** Corrections that were due but refused, with the reason (a quantity computed from `corrected` would be wrong). */
  readonly refused: readonly { readonly name: string; readonly reason: string }[];
}

function record(context: StepContext, target: AppliedCorrection['target'], result: CorrectionResult): Spectrum {
  context.corrections.push({
    name: result.record.name,
    target,
    inputs: result.record.inputs,
    parameters: result.record.parameters,
    warnings: result.record.warnings,
  });
  for (const warning of result.record.warnings) context.warnings.push(`${result.record.name} (${target}): ${warning}`);
  return result.spectrum;
}

function tryCorrection(
  context: StepContext,
  target: AppliedCorrection['target'],
  what: string,
  apply: () => CorrectionResult,
  refused: { name: string; reason: string }[],
): CorrectionResult | undefined {
  try {
    return apply();
  } catch (error) {
    const reason = reasonOf(error);
    markMissing(context, `${what} (${target})`, reason);
    refused.push({ name: what, reason });
    return undefined;
  }
}

/** Applies the available corrections to `emission` in order; a correction that cannot run is reported, not fatal. */
export function correctEmission(
  emission: Spectrum,
  inputs: { blank?: Spectrum; detectorCurve?: Spectrum; absorbance?: Spectrum; excitationNm?: number },
  settings: AnalysisSettings,
  target: AppliedCorrection['target'],
  context: StepContext,
): CorrectedEmission {
  let spectrum = emission;
  const { blank, detectorCurve, absorbance } = inputs;
  const applied: string[] = [];
  const refused: { name: string; reason: string }[] = [];
  if (blank !== undefined) {
    const done = tryCorrection(context, target, 'subtractBlank', () => subtractBlank(spectrum, blank), refused);
    if (done !== undefined) {
      spectrum = record(context, target, done);
      applied.push(done.record.name);
    }
  }
  if (detectorCurve !== undefined) {
    const done = tryCorrection(
      context,
      target,
      'applyDetectorCorrection',
      () =>
        applyDetectorCorrection(spectrum, detectorCurve, {
          curveMeaning: settings.detectorCurveMeaning ?? 'from-header',
        }),
      refused,
    );
    if (done !== undefined) {
      spectrum = record(context, target, done);
      applied.push(done.record.name);
    }
  }
  if (absorbance !== undefined && settings.innerFilter !== 'none') {
    const method = settings.innerFilter;
    const done = tryCorrection(
      context,
      target,
      'correctInnerFilter',
      () =>
        correctInnerFilter(spectrum, absorbance, {
          method,
          ...(inputs.excitationNm === undefined ? {} : { excitationNm: inputs.excitationNm }),
          cellPathCm: settings.cuvette.pathLengthCm,
          excitationZoneCm: [settings.cuvette.excitationWindowStartCm, settings.cuvette.excitationWindowEndCm],
        }),
      refused,
    );
    if (done !== undefined) {
      spectrum = record(context, target, done);
      applied.push(done.record.name);
    }
  }
  return { corrected: spectrum, applied, refused };
}

/** Peak, width and integral of an emission spectrum. */
export function emissionMetrics(spectrum: Spectrum): EmissionMetrics {
  const metrics = spectrumMetrics(spectrum);
  const axis = spectrum.wavelengthNm;
  return {
    peakWavelengthNm: metrics.peakWavelengthNm,
    peakValue: metrics.peakValue,
    integratedIntensity: metrics.integratedIntensity,
    ...(metrics.fwhmNm === undefined ? {} : { fwhmNm: metrics.fwhmNm }),
    valueUnit: spectrum.valueUnit,
    rangeNm: [itemAt(axis, 0), itemAt(axis, axis.length - 1)],
  };
}

/** Absorbance per cm at the excitation wavelength and the absorbance maximum; undefined when the axis misses the excitation. */
export function absorbanceSummary(
  absorbance: Spectrum,
  excitationNm: number,
  fallbackPathLengthCm: number,
): AbsorbanceSummary | undefined {
  const pathCm = absorbance.metadata.pathLengthCm ?? fallbackPathLengthCm;
  const values =
    absorbance.kind === 'transmittance'
      ? absorbance.values.map(
          (t) =>
            -Math.log10(absorbance.valueUnit.includes('percent') || absorbance.valueUnit.includes('%') ? t / 100 : t),
        )
      : absorbance.values;
  const atExcitation = interpolateAt(absorbance.wavelengthNm, values, excitationNm);
  if (atExcitation === undefined) return undefined;
  let peakIndex = 0;
  for (let i = 1; i < values.length; i++) if (itemAt(values, i) > itemAt(values, peakIndex)) peakIndex = i;
  return {
    absorbanceAtExcitation: atExcitation / pathCm,
    excitationNm,
    peakWavelengthNm: itemAt(absorbance.wavelengthNm, peakIndex),
    peakAbsorbance: itemAt(values, peakIndex) / pathCm,
  };
}
