// Instrument profiles: how a lab declares, once and without code, a layout the sniffing cannot
// settle (config `formats.profiles`). Each profile names a file pattern and fixes what the reader
// would otherwise guess: separator, decimal mark, header lines, axis column and unit, value, IRF
// and reference columns, channel width, kind and role. The schema is shared with src/config.
import { z } from 'zod';
import { MEASUREMENT_ROLES, SPECTRUM_KINDS } from '../model/spectrum.js';
import { itemAt } from '../model/item-at.js';

const columnRef = z.union([z.string().min(1), z.number().int().positive()]);

/** One instrument profile (zod schema; descriptions give each field's unit and default). */
export const formatProfileSchema = z.strictObject({
  name: z
    .string()
    .min(1)
    .optional()
    .describe(
      'A label shown by `driftlight inspect` and in the layout of each file read with this profile. Default: the match pattern',
    ),
  match: z
    .string()
    .min(1)
    .describe(
      'File pattern (glob: * any characters but /, ** any, ? one character; case-insensitive) matched against the file name, or against the path when it holds a /. The first matching profile is used. Required',
    ),
  delimiter: z
    .enum(['comma', 'tab', 'semicolon', 'whitespace'])
    .optional()
    .describe('Column separator. Default: sniffed'),
  decimalMark: z.enum(['.', ',']).optional().describe('Decimal mark of the numbers. Default: sniffed'),
  headerLines: z
    .number()
    .int()
    .min(0)
    .optional()
    .describe(
      'Lines before the first data row (metadata, column names, blank lines), counted in the file. Default: sniffed',
    ),
  columnNamesLine: z
    .number()
    .int()
    .min(0)
    .optional()
    .describe(
      '1-based line holding the column names; 0 = the file names no columns (they become "column 1", "column 2", …). Default: sniffed (the line just above the data)',
    ),
  axisColumn: columnRef
    .optional()
    .describe(
      'The axis column: its name (case-insensitive) or its 1-based number. Default: the first column whose name reads as an axis, else column 1',
    ),
  axisUnit: z
    .string()
    .min(1)
    .optional()
    .describe(
      'Unit of the axis column: nm, µm, cm-1, cm-1 shift (Raman shift), eV, ps, ns, µs, ms, s, or channel (then channelWidthNs is needed). Default: read from the column name',
    ),
  valueColumns: z
    .array(columnRef)
    .min(1)
    .optional()
    .describe(
      'Columns holding counts (decays) or intensity/absorbance (spectra), by name or 1-based number; each becomes its own measurement. Default: every measurement column found by name',
    ),
  irfColumn: columnRef
    .optional()
    .describe(
      'Column holding the IRF of a decay file. Default: the column named IRF / instrument response / prompt, if any',
    ),
  referenceColumn: columnRef
    .optional()
    .describe(
      'Reference-detector (lamp monitor) column kept beside each spectrum for the reference-channel correction. Default: found by name (ref, reference, lamp, monitor)',
    ),
  channelWidthNs: z
    .number()
    .positive()
    .optional()
    .describe('Width of one decay channel, in ns. Default: from the header, else the mean step of the time axis'),
  excitationNm: z
    .number()
    .positive()
    .optional()
    .describe('Excitation wavelength in nm (needed to convert a Raman-shift axis). Default: from the header'),
  kind: z
    .enum([...SPECTRUM_KINDS, 'decay'])
    .optional()
    .describe('What the files hold. Default: from the header, the column names and the axis unit'),
  role: z
    .enum(MEASUREMENT_ROLES)
    .optional()
    .describe('Measurement role of the files (sample, control, reference, blank, irf, …). Default: from the header'),
});

/** A profile as written in the config. */
export type FormatProfile = z.input<typeof formatProfileSchema>;
/** A validated profile. */
export type ResolvedFormatProfile = Readonly<z.output<typeof formatProfileSchema>>;

const DELIMITERS = { comma: ',', tab: '\t', semicolon: ';', whitespace: 'whitespace' } as const;

/** The reader's delimiter for a profile's delimiter word. */
export function profileDelimiter(
  word: NonNullable<ResolvedFormatProfile['delimiter']>,
): ',' | '\t' | ';' | 'whitespace' {
  return DELIMITERS[word];
}

/** A glob as a case-insensitive regular expression (* = any but /, ** = any, ? = one character). */
function globToRegExp(glob: string): RegExp {
  let pattern = '';
  for (let i = 0; i < glob.length; i++) {
    const char = itemAt(glob, i);
    if (char === '*' && glob[i + 1] === '*') {
      pattern += '.*';
      i++;
      if (glob[i + 1] === '/') i++;
    } else if (char === '*') pattern += '[^/]*';
    else if (char === '?') pattern += '[^/]';
    else pattern += char.replace(/[.+^${}()|[\]\\]/g, '\\$&');
  }
  return new RegExp(`^${pattern}$`, 'i');
}

/** The first profile whose pattern matches `fileName` (its last path part, or the whole path when the pattern holds a /). */
export function matchProfile(
  profiles: readonly ResolvedFormatProfile[],
  fileName: string,
): ResolvedFormatProfile | undefined {
  const path = fileName.replace(/\\/g, '/');
  const base = path.slice(path.lastIndexOf('/') + 1);
  return profiles.find((profile) => {
    const regExp = globToRegExp(profile.match);
    if (!profile.match.includes('/')) return regExp.test(base);
    // A pattern with folders matches the path or any tail of it ("inbox/tcspc/*.txt" matches "/data/inbox/tcspc/a.txt").
    return path.split('/').some((_, index, parts) => regExp.test(parts.slice(index).join('/')));
  });
}
