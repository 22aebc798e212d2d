// Emission spectral (detector) correction: multiply by a curve of correction factors, or divide by a curve of
// the instrument's relative response (sensitivity); never extrapolates, never guesses which of the two a curve is.
import { z } from 'zod';
import { InputRejected } from '../model/errors.js';
import { withValues, type Spectrum } from '../model/spectrum.js';
import { makeCorrectionRecord, type CorrectionResult } from './correction-record.js';
import { resampleOnto } from './interpolate.js';
import { resolveWithSchema } from './options.js';
import { itemAt } from '../model/item-at.js';

const detectorOptionsSchema = z
  .object({
    /**
     * 'multiply' when the curve holds correction factors, 'divide' when it holds the instrument's relative response
     * (sensitivity); 'from-header' (default) reads it from the curve's value column, unit and header, and refuses when
     * they do not tell.
     */
    curveMeaning: z.enum(['from-header', 'multiply', 'divide']).default('from-header'),
  })
  .strict();

/** User-facing options of applyDetectorCorrection. */
export type DetectorCorrectionOptions = z.input<typeof detectorOptionsSchema>;
export type ResolvedDetectorCorrectionOptions = Readonly<z.output<typeof detectorOptionsSchema>>;

/** Validates DetectorCorrectionOptions, fills defaults, freezes. */
export function resolveDetectorCorrectionOptions(
  options?: DetectorCorrectionOptions,
): ResolvedDetectorCorrectionOptions {
  return resolveWithSchema(detectorOptionsSchema, options, 'corrections.detector');
}

const FACTOR_WORDS = /correction|factor|multipl/i;
const RESPONSE_WORDS = /sensitivity|response|responsivity|efficiency/i;

/**
 * What a curve's own words say it holds: 'multiply' (correction factors), 'divide' (relative response or sensitivity),
 * or undefined when they say neither or both (value column, unit, and header entries other than the file's role).
 */
export function detectorCurveMeaningFromHeader(
  curve: Spectrum,
): { readonly meaning: 'multiply' | 'divide'; readonly evidence: string } | undefined {
  const texts = [
    ['value column', curve.valueColumn],
    ['value unit', curve.valueUnit],
    ...Object.entries(curve.metadata.extra).map(([key, value]) => [`header "${key}"`, `${key} ${value}`]),
  ] as const;
  const factor = texts.find(([, text]) => FACTOR_WORDS.test(text));
  const response = texts.find(([, text]) => RESPONSE_WORDS.test(text) && !FACTOR_WORDS.test(text));
  if (factor !== undefined && response === undefined)
    return { meaning: 'multiply', evidence: `${factor[0]} "${factor[1]}"` };
  if (response !== undefined && factor === undefined)
    return { meaning: 'divide', evidence: `${response[0]} "${response[1]}"` };
  return undefined;
}

/** I_corr(λ) = I(λ)·c(λ) for correction factors, I(λ)/R(λ) for a relative response, curve linearly interpolated (nm); throws AXIS_NOT_COVERED rather than extrapolate (ASTM E3029 practice: correct only inside the calibrated range). */
export function applyDetectorCorrection(
  spectrum: Spectrum,
  curve: Spectrum,
  options?: DetectorCorrectionOptions,
): CorrectionResult {
  const resolved = resolveDetectorCorrectionOptions(options);
  const curveOnAxis = resampleOnto(
    curve.wavelengthNm,
    curve.values,
    spectrum.wavelengthNm,
    'the detector correction curve',
  );
  const fromHeader = resolved.curveMeaning === 'from-header' ? detectorCurveMeaningFromHeader(curve) : undefined;
  const meaning = resolved.curveMeaning === 'from-header' ? fromHeader?.meaning : resolved.curveMeaning;
  if (meaning === undefined) {
    throw new InputRejected(
      'INPUT_INVALID',
      `the detector curve (value column "${curve.valueColumn}", unit "${curve.valueUnit}") does not say whether it holds correction factors ` +
        '(to multiply) or the relative response / sensitivity of the instrument (to divide by); applying it the wrong way doubles the instrument response',
      {
        hint: 'name the value column "correction factor" or "relative response", or set instrument.detectorCurveMeaning (config) / --detector-curve-meaning (CLI) to multiply or divide',
      },
    );
  }
  const out = new Float64Array(spectrum.values.length);
  for (let i = 0; i < out.length; i++) {
    const curveValue = itemAt(curveOnAxis, i);
    if (!(curveValue > 0)) {
      throw new InputRejected(
        'INPUT_INVALID',
        `the detector correction curve is ${curveValue} at ${spectrum.wavelengthNm[i]} nm; it must be positive`,
      );
    }
    const raw = itemAt(spectrum.values, i);
    out[i] = meaning === 'multiply' ? raw * curveValue : raw / curveValue;
  }
  const first = itemAt(curve.wavelengthNm, 0);
  const last = itemAt(curve.wavelengthNm, curve.wavelengthNm.length - 1);
  return {
    spectrum: withValues(spectrum, out),
    record: makeCorrectionRecord(
      'applyDetectorCorrection',
      { detectorCurve: curve },
      {
        curveMeaning: meaning,
        curveMeaningFrom: fromHeader === undefined ? 'option' : fromHeader.evidence,
        curveFromNm: first,
        curveToNm: last,
      },
      [],
    ),
  };
}
