// Excitation-intensity normalisation: divide the signal by the reference-detector (lamp monitor) channel.
import { z } from 'zod';
import { InputRejected } from '../model/errors.js';
import { withValues, type Spectrum } from '../model/spectrum.js';
import { makeCorrectionRecord, type CorrectionResult } from './correction-record.js';
import { resolveWithSchema } from './options.js';
import { itemAt } from '../model/item-at.js';

/** Column names taken for a reference-detector channel when none is named (case-insensitive). */
const REFERENCE_COLUMN_PATTERN =
  /^(r|r1|ref|reference|reference[ _-]?(detector|channel|signal)|lamp|lamp[ _-]?monitor|monitor)\b/i;

const referenceChannelOptionsSchema = z
  .object({
    /** Name of the reference-detector column in Spectrum.otherColumns (default: found by name). */
    column: z.string().min(1).optional(),
  })
  .strict();

/** User-facing options of normalizeByReferenceChannel. */
export type ReferenceChannelOptions = z.input<typeof referenceChannelOptionsSchema>;
export type ResolvedReferenceChannelOptions = Readonly<z.output<typeof referenceChannelOptionsSchema>>;

/** Validates ReferenceChannelOptions, freezes. */
export function resolveReferenceChannelOptions(options?: ReferenceChannelOptions): ResolvedReferenceChannelOptions {
  return resolveWithSchema(referenceChannelOptionsSchema, options, 'corrections.referenceChannel');
}

/** Name of the spectrum's reference-detector column (R, Ref, Lamp monitor, …), or undefined when the export has none. */
export function findReferenceChannel(spectrum: Spectrum): string | undefined {
  return Object.keys(spectrum.otherColumns).find((name) => REFERENCE_COLUMN_PATTERN.test(name.trim()));
}

/** Signal/reference point by point (S/R, unit '<unit>/ref'); corrects lamp drift and excitation-spectrum shape; common practice (Lakowicz ch. 2). */
export function normalizeByReferenceChannel(spectrum: Spectrum, options?: ReferenceChannelOptions): CorrectionResult {
  const resolved = resolveReferenceChannelOptions(options);
  const column = resolved.column ?? findReferenceChannel(spectrum);
  const reference = column === undefined ? undefined : spectrum.otherColumns[column];
  if (column === undefined || reference === undefined) {
    throw new InputRejected(
      'MISSING_COLUMN',
      `no reference-detector column ${column === undefined ? 'found' : `named "${column}"`} among ` +
        `[${Object.keys(spectrum.otherColumns).join(', ')}]`,
    );
  }
  const out = new Float64Array(spectrum.values.length);
  for (let i = 0; i < out.length; i++) {
    const referenceValue = itemAt(reference, i);
    if (!(referenceValue > 0)) {
      throw new InputRejected(
        'INPUT_INVALID',
        `the reference channel "${column}" is ${referenceValue} at ${spectrum.wavelengthNm[i]} nm; it must be positive to divide by`,
      );
    }
    out[i] = itemAt(spectrum.values, i) / referenceValue;
  }
  return {
    spectrum: withValues(spectrum, out, `${spectrum.valueUnit}/ref`),
    record: makeCorrectionRecord('normalizeByReferenceChannel', {}, { referenceColumn: column }, []),
  };
}
