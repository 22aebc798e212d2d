// Config section `controls`: the daily control fluorophore(s) — the one place a control is defined
// (id, sample-id pattern, optional targets); every rule of the rule set judges each control unless
// the rule names specific ones (docs/qc.md).
import { z } from 'zod';
import { METRIC_NAMES } from '../../qc/metrics.js';

const fraction = z
  .number({ error: 'expected a number between 0 and 1' })
  .min(0, { error: 'expected a number between 0 and 1' })
  .max(1, { error: 'expected a number between 0 and 1' });

export const controlEntry = z.strictObject({
  id: z
    .string()
    .regex(/^[A-Za-z0-9][A-Za-z0-9._-]*$/, { error: 'expected letters, digits, ".", "_" or "-"' })
    .describe('Name of the control (letters, digits, ".", "_", "-"); alerts and `rules` commands use it.'),
  label: z.string().min(1).optional().describe('Wording used in messages. Default: the id'),
  sampleIdPattern: z
    .string()
    .min(1)
    .describe('Regular expression matched against sample ids; a match makes the set a control set.'),
  targetYield: fraction.optional().describe('Expected quantum yield. Default: none'),
  sdYield: z.number().positive().optional().describe('Expected standard deviation of the yield. Default: none'),
  targetTauNs: z.number().positive().optional().describe('Expected intensity-weighted lifetime in ns. Default: none'),
  sdTauNs: z
    .number()
    .positive()
    .optional()
    .describe('Expected standard deviation of that lifetime in ns. Default: none'),
  targets: z
    .partialRecord(
      z.enum(METRIC_NAMES, { error: `expected one of ${METRIC_NAMES.join(', ')}` }),
      z.strictObject({ mean: z.number(), sd: z.number().positive() }),
    )
    .optional()
    .describe(
      "Declared target { mean, sd } per metric (e.g. intensityPerAbsorbedLight, in the metric's unit); targetYield/targetTauNs fill the yield and lifetime. Default: none (baseline from runs)",
    ),
  measurement: z
    .string()
    .trim()
    .min(1, { error: 'expected a column name, e.g. "parallel" or "em 450 nm"' })
    .optional()
    .describe(
      "When the control's files hold several measurements (decay columns, spectra on one axis, x,y pairs): the column this control judges, as `driftlight inspect` names it; the other measurements' results say they were not judged. Define a second control with the same pattern to judge another column as a series of its own. Default: the first measurement of the file",
    ),
  baselineRuns: z
    .number()
    .int()
    .min(2)
    .default(20)
    .describe(
      'Metrics without a declared target are judged against the mean and SD of this many first runs (Levey–Jennings practice). Default: 20',
    ),
});

export const controlsSection = z
  .array(controlEntry)
  .superRefine((entries, context) => {
    // Two controls with the same pattern must judge different measurements, or the second judges nothing.
    entries.forEach((entry, index) => {
      const earlier = entries.findIndex(
        (other) => other.sampleIdPattern === entry.sampleIdPattern && other.measurement === entry.measurement,
      );
      if (earlier < index) {
        context.addIssue({
          code: 'custom',
          path: [index, 'measurement'],
          message: `controls[${earlier}] already judges ${entry.measurement === undefined ? 'the first measurement' : `measurement "${entry.measurement}"`} of sample ids matching "${entry.sampleIdPattern}"; give each control with this pattern a different measurement (a column name)`,
        });
      }
    });
  })
  .default([])
  .describe('Control fluorophores checked by the QC rules. Default: []');

export type ControlConfig = z.output<typeof controlEntry>;
