// Config section `assembly`: how files are grouped into measurement sets and paired with recent
// supporting measurements (IRF, blank, absorbance, reference standard).
import { z } from 'zod';
import { SET_PARTS } from '../../analysis/result.js';

const part = z.enum(SET_PARTS);

/** Default file-name pattern: SAMPLEID_PART.ext, e.g. `dye-07_em.csv`, `dye-07_irf.txt`. */
export const DEFAULT_FILE_NAME_PATTERN =
  '^(?<sampleId>.+?)[_-](?<part>em|emission|abs|absorbance|decay|tcspc|irf|blank|raman|ref-em|ref-abs|detector)(?:[_-][^.]*)?\\.[A-Za-z0-9]+$';

export const assemblySection = z
  .strictObject({
    setTimeoutMs: z
      .number()
      .int()
      .min(0)
      .max(7 * 24 * 3_600_000)
      .default(600_000)
      .describe(
        'A set still missing a required part this long after its first file (ms) is paired with recent parts, then processed as partial. Default: 600000 (10 min)',
      ),
    requiredParts: z
      .array(part)
      .default(['emission', 'absorbance', 'decay', 'irf'])
      .describe(
        'Parts a sample or control set needs before it is complete. Default: [emission, absorbance, decay, irf]',
      ),
    referenceRequiredParts: z
      .array(part)
      .default(['emission', 'absorbance'])
      .describe('Parts a reference-standard set needs. Default: [emission, absorbance]'),
    pairingWindowHours: z
      .strictObject({
        blank: z.number().min(0).default(24).describe('Most recent blank no older than this, in hours. Default: 24'),
        absorbance: z
          .number()
          .min(0)
          .default(0)
          .describe('Absorbance of the same sample id no older than this, in hours (0 = never borrowed). Default: 0'),
        reference: z
          .number()
          .min(0)
          .default(72)
          .describe('Most recent reference-standard set no older than this, in hours. Default: 72'),
      })
      .prefault({}),
    referenceSessionHours: z
      .number()
      .min(0)
      .max(48)
      .default(4)
      .describe(
        "A sample or control set with an emission but no reference standard measured within this many hours of it (its session) waits for one until its deadline (assembly.setTimeoutMs), and is paired with the session's reference in preference to an older one; a reference that arrives after such a set was analysed re-analyses it (the newer result supersedes, recorded in provenance.reanalysis). 0 = no waiting, no re-analysis. Default: 4",
      ),
    fileNamePatterns: z
      .array(z.string().min(1))
      .default([DEFAULT_FILE_NAME_PATTERN])
      .describe(
        'Regular expressions with named groups `sampleId` and `part` (em, abs, decay, irf, blank, raman, ref-em, ref-abs, detector), tried in order when the file itself does not say. Default: one pattern for SAMPLEID_PART.ext',
      ),
    manifestSuffixes: z
      .array(z.string().min(1))
      .default(['.set.yaml', '.set.yml', '.set.json'])
      .describe('File-name endings that mark a set manifest. Default: [.set.yaml, .set.yml, .set.json]'),
  })
  .prefault({});

export type AssemblyConfig = z.output<typeof assemblySection>;
