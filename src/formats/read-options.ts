// Options of readData(): the user-facing partial type and its one resolver (zod: validate, default, freeze).
import { z } from 'zod';
import { InputRejected } from '../model/errors.js';
import { SPECTRUM_KINDS, type SpectrumKind } from '../model/spectrum.js';
import { formatProfileSchema, matchProfile, type FormatProfile, type ResolvedFormatProfile } from './profile.js';

/** Default size limit in bytes (50 MB). */
export const DEFAULT_MAX_BYTES = 52_428_800;

export interface ReadOptions {
  /** Name or path of the file, used only in error messages and never opened. */
  fileName: string;
  /** Largest accepted content in bytes; default 52428800 (50 MB). */
  maxBytes?: number;
  /** What the caller expects when the content does not say; the content wins when it does. */
  kindHint?: SpectrumKind | 'decay';
  /** Column to use as values (spectra) or counts (decays): a column name (case-insensitive) or a 1-based column number as counted in the file (axis column included). */
  valueColumn?: string | number;
  /** Instrument profiles (config formats.profiles); the first whose pattern matches fileName fixes the layout. Default: none. */
  profiles?: readonly FormatProfile[];
}

export type ResolvedReadOptions = Readonly<
  Required<Pick<ReadOptions, 'fileName' | 'maxBytes'>> &
    Pick<ReadOptions, 'kindHint' | 'valueColumn'> & {
      /** The profile matching the file, when one does. */
      profile?: ResolvedFormatProfile;
    }
>;

const readOptionsSchema = z.object({
  fileName: z.string().min(1),
  maxBytes: z.number().int().positive().default(DEFAULT_MAX_BYTES),
  kindHint: z.enum([...SPECTRUM_KINDS, 'decay']).optional(),
  valueColumn: z.union([z.string().min(1), z.number().int().positive()]).optional(),
  profiles: z.array(formatProfileSchema).optional(),
});

/** Validates ReadOptions, fills defaults (maxBytes 50 MB) and freezes; throws InputRejected (INPUT_INVALID) on a bad option. */
export function resolveReadOptions(options: ReadOptions): ResolvedReadOptions {
  const parsed = readOptionsSchema.safeParse(options);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const where = issue === undefined ? '' : `${issue.path.join('.')}: ${issue.message}`;
    throw new InputRejected('INPUT_INVALID', `invalid read options (${where})`, {
      file: typeof options.fileName === 'string' ? options.fileName : undefined,
      hint: 'fileName must be a non-empty string, maxBytes a positive integer, valueColumn a name or a 1-based column number, profiles as in docs/formats.md.',
    });
  }
  const { fileName, maxBytes, kindHint, valueColumn, profiles } = parsed.data;
  const profile = profiles === undefined ? undefined : matchProfile(profiles, fileName);
  return Object.freeze({
    ...(profile === undefined ? {} : { profile: Object.freeze(profile) }),
    fileName,
    maxBytes,
    ...(kindHint === undefined ? {} : { kindHint }),
    ...(valueColumn === undefined ? {} : { valueColumn }),
  });
}
