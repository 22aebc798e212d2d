// The set manifest: a small sidecar (YAML or JSON, NAME.set.yaml / .set.json) that says which files
// form one measurement set, the part each supplies, and sample facts. Documented in docs/pipeline.md.
import { parse as parseYaml } from 'yaml';
import { z } from 'zod';
import { InputRejected } from '../model/errors.js';
import { problemLines, problemsFromIssues } from '../model/config-problems.js';
import { MEASUREMENT_ROLES } from '../model/spectrum.js';
import { SET_PARTS } from '../analysis/result.js';

export const MANIFEST_SCHEMA = 'driftlight.set/1' as const;

const manifestSchema = z.strictObject({
  schema: z.literal(MANIFEST_SCHEMA).optional(),
  sampleId: z.string().min(1),
  role: z.enum(['sample', 'control', 'reference']).default('sample'),
  solvent: z.string().min(1).optional(),
  excitationNm: z.number().positive().optional(),
  standardId: z.string().min(1).optional(),
  notes: z.string().optional(),
  files: z
    .array(
      z.strictObject({
        file: z
          .string()
          .min(1)
          .refine((f) => !f.includes('/') && !f.includes('\\'), "a plain file name in the manifest's folder"),
        part: z.enum(SET_PARTS),
        role: z.enum(MEASUREMENT_ROLES).optional(),
      }),
    )
    .min(1),
});

/** A parsed set manifest. */
export type SetManifest = z.output<typeof manifestSchema>;

/** Parses manifest text (YAML or JSON); throws InputRejected (MANIFEST_INVALID) naming the bad field. */
export function parseManifest(text: string, fileName: string): SetManifest {
  let raw: unknown;
  try {
    raw = parseYaml(text) as unknown;
  } catch (error) {
    throw new InputRejected(
      'MANIFEST_INVALID',
      `the manifest is not valid YAML/JSON: ${(error as Error).message.split('\n')[0] ?? ''}`,
      { file: fileName },
    );
  }
  const parsed = manifestSchema.safeParse(raw);
  if (!parsed.success) {
    const problems = problemLines(problemsFromIssues(parsed.error.issues, manifestSchema, raw)).join('; ');
    throw new InputRejected('MANIFEST_INVALID', `the manifest is invalid: ${problems}`, { file: fileName });
  }
  return parsed.data;
}

/** True when `fileName` ends with one of the manifest suffixes. */
export function isManifestName(fileName: string, suffixes: readonly string[]): boolean {
  const lower = fileName.toLowerCase();
  return suffixes.some((suffix) => lower.endsWith(suffix.toLowerCase()));
}
