// Solvent blank subtraction at matched excitation: removes solvent background and the solvent Raman band.
import { z } from 'zod';
import { InputRejected } from '../model/errors.js';
import { withValues, type Spectrum } from '../model/spectrum.js';
import { makeCorrectionRecord, type CorrectionResult } from './correction-record.js';
import { resampleOnto } from './interpolate.js';
import { resolveWithSchema } from './options.js';
import { itemAt } from '../model/item-at.js';

const blankOptionsSchema = z
  .object({
    /** Largest accepted difference between sample and blank excitation wavelengths, nm (default 1). */
    excitationToleranceNm: z.number().nonnegative().default(1),
    /** What to do when the excitation wavelengths differ by more than the tolerance (default 'refuse'). */
    onExcitationMismatch: z.enum(['refuse', 'warn']).default('refuse'),
    /** Multiplier applied to the blank before subtraction, e.g. for a different integration time (default 1). */
    blankScale: z.number().positive().default(1),
  })
  .strict();

/** User-facing options of subtractBlank. */
export type BlankOptions = z.input<typeof blankOptionsSchema>;
export type ResolvedBlankOptions = Readonly<z.output<typeof blankOptionsSchema>>;

/** Validates BlankOptions, fills defaults, freezes. */
export function resolveBlankOptions(options?: BlankOptions): ResolvedBlankOptions {
  return resolveWithSchema(blankOptionsSchema, options, 'corrections.blank');
}

/** Sample − blankScale·blank, blank linearly interpolated onto the sample's nm axis; checks matched excitation (nm); common practice (Lakowicz ch. 2). */
export function subtractBlank(sample: Spectrum, blank: Spectrum, options?: BlankOptions): CorrectionResult {
  const resolved = resolveBlankOptions(options);
  const warnings: string[] = [];
  const sampleExcitationNm = sample.metadata.excitationNm;
  const blankExcitationNm = blank.metadata.excitationNm;
  if (sampleExcitationNm === undefined || blankExcitationNm === undefined) {
    warnings.push(
      'the excitation wavelength of the sample or the blank is unknown; matched excitation was not verified',
    );
  } else {
    const differenceNm = Math.abs(sampleExcitationNm - blankExcitationNm);
    if (differenceNm > resolved.excitationToleranceNm) {
      const message =
        `the blank was excited at ${blankExcitationNm} nm but the sample at ${sampleExcitationNm} nm ` +
        `(difference ${differenceNm} nm > tolerance ${resolved.excitationToleranceNm} nm); its Raman band would not cancel`;
      if (resolved.onExcitationMismatch === 'refuse') throw new InputRejected('EXCITATION_MISMATCH', message);
      warnings.push(message);
    }
  }
  const blankOnAxis = resampleOnto(blank.wavelengthNm, blank.values, sample.wavelengthNm, 'the blank spectrum');
  const out = new Float64Array(sample.values.length);
  for (let i = 0; i < out.length; i++) {
    out[i] = itemAt(sample.values, i) - resolved.blankScale * itemAt(blankOnAxis, i);
  }
  return {
    spectrum: withValues(sample, out),
    record: makeCorrectionRecord(
      'subtractBlank',
      { blank },
      {
        blankScale: resolved.blankScale,
        excitationToleranceNm: resolved.excitationToleranceNm,
        onExcitationMismatch: resolved.onExcitationMismatch,
        sampleExcitationNm,
        blankExcitationNm,
      },
      warnings,
    ),
  };
}
