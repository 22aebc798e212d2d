// Dark (detector background) subtraction: a constant level or a dark spectrum, scaled by integration time when both are known.
import { z } from 'zod';
import { InputRejected } from '../model/errors.js';
import { withValues, type Spectrum } from '../model/spectrum.js';
import { makeCorrectionRecord, type CorrectionResult } from './correction-record.js';
import { resampleOnto } from './interpolate.js';
import { resolveWithSchema } from './options.js';
import { itemAt } from '../model/item-at.js';

const darkOptionsSchema = z
  .object({
    /** Scale a dark spectrum by sample/dark integration time when both are in the metadata (default true). */
    scaleByIntegrationTime: z.boolean().default(true),
  })
  .strict();

/** User-facing options of subtractDark. */
export type DarkOptions = z.input<typeof darkOptionsSchema>;
export type ResolvedDarkOptions = Readonly<z.output<typeof darkOptionsSchema>>;

/** Validates DarkOptions, fills defaults, freezes. */
export function resolveDarkOptions(options?: DarkOptions): ResolvedDarkOptions {
  return resolveWithSchema(darkOptionsSchema, options, 'corrections.dark');
}

/** Subtracts a dark level (same unit as the values) or a dark spectrum linearly interpolated onto the sample axis (no extrapolation); common practice. */
export function subtractDark(spectrum: Spectrum, dark: Spectrum | number, options?: DarkOptions): CorrectionResult {
  const resolved = resolveDarkOptions(options);
  const warnings: string[] = [];
  const out = new Float64Array(spectrum.values.length);
  if (typeof dark === 'number') {
    if (!Number.isFinite(dark)) throw new InputRejected('NON_FINITE', `the dark level ${dark} is not a finite number`);
    for (let i = 0; i < out.length; i++) out[i] = itemAt(spectrum.values, i) - dark;
    return {
      spectrum: withValues(spectrum, out),
      record: makeCorrectionRecord('subtractDark', {}, { darkLevel: dark }, warnings),
    };
  }
  const darkOnAxis = resampleOnto(dark.wavelengthNm, dark.values, spectrum.wavelengthNm, 'the dark spectrum');
  let scale = 1;
  const sampleTimeS = spectrum.metadata.integrationTimeS;
  const darkTimeS = dark.metadata.integrationTimeS;
  if (resolved.scaleByIntegrationTime && sampleTimeS !== undefined && darkTimeS !== undefined && darkTimeS > 0) {
    scale = sampleTimeS / darkTimeS;
  } else if (sampleTimeS !== darkTimeS) {
    warnings.push(
      'integration times of sample and dark differ or are unknown; the dark spectrum was subtracted unscaled',
    );
  }
  for (let i = 0; i < out.length; i++) out[i] = itemAt(spectrum.values, i) - scale * itemAt(darkOnAxis, i);
  return {
    spectrum: withValues(spectrum, out),
    record: makeCorrectionRecord('subtractDark', { dark }, { darkScale: scale }, warnings),
  };
}
