// Emission spectral (detector) correction: multiply by an interpolated correction curve; never extrapolates.
import { z } from 'zod';
import { InputRejected } from '../model/errors.js';
import { withValues, type Spectrum } from '../model/spectrum.js';
import { makeCorrectionRecord, type CorrectionResult } from './correction-record.js';
import { resampleOnto } from './interpolate.js';
import { resolveWithSchema } from './options.js';

const detectorOptionsSchema = z
  .object({
    /** 'multiply' when the curve holds correction factors, 'divide' when it holds the instrument's relative response (default 'multiply'). */
    curveMeaning: z.enum(['multiply', 'divide']).default('multiply'),
  })
  .strict();

/** User-facing options of applyDetectorCorrection. */
export type DetectorCorrectionOptions = z.input<typeof detectorOptionsSchema>;
export type ResolvedDetectorCorrectionOptions = Readonly<z.output<typeof detectorOptionsSchema>>;

/** Validates DetectorCorrectionOptions, fills defaults, freezes. */
export function resolveDetectorCorrectionOptions(options?: DetectorCorrectionOptions): ResolvedDetectorCorrectionOptions {
  return resolveWithSchema(detectorOptionsSchema, options, 'corrections.detector');
}

/** I_corr(λ) = I(λ)·c(λ) with c linearly interpolated (nm); throws AXIS_NOT_COVERED rather than extrapolate (ASTM E3029 practice: correct only inside the calibrated range). */
export function applyDetectorCorrection(
  spectrum: Spectrum,
  curve: Spectrum,
  options?: DetectorCorrectionOptions,
): CorrectionResult {
  const resolved = resolveDetectorCorrectionOptions(options);
  const curveOnAxis = resampleOnto(curve.wavelengthNm, curve.values, spectrum.wavelengthNm, 'the detector correction curve');
  const out = new Float64Array(spectrum.values.length);
  for (let i = 0; i < out.length; i++) {
    const curveValue = curveOnAxis[i] as number;
    if (!(curveValue > 0)) {
      throw new InputRejected(
        'INPUT_INVALID',
        `the detector correction curve is ${curveValue} at ${spectrum.wavelengthNm[i]} nm; it must be positive`,
      );
    }
    const raw = spectrum.values[i] as number;
    out[i] = resolved.curveMeaning === 'multiply' ? raw * curveValue : raw / curveValue;
  }
  const first = curve.wavelengthNm[0] as number;
  const last = curve.wavelengthNm[curve.wavelengthNm.length - 1] as number;
  return {
    spectrum: withValues(spectrum, out),
    record: makeCorrectionRecord(
      'applyDetectorCorrection',
      { detectorCurve: curve },
      { curveMeaning: resolved.curveMeaning, curveFromNm: first, curveToNm: last },
      [],
    ),
  };
}
