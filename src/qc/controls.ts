// Control definitions: which measurements are controls (sample-id pattern and/or role), with declared
// targets (mean and SD per metric) or a baseline established from the first N in-control runs.
import { z } from 'zod';
import { METRIC_NAMES, type MetricName } from './metrics.js';
import { positiveNumber, wholeNumberAtLeast } from './rule-base.js';

/** Levey–Jennings practice: establish mean and SD from 20 runs (common practice). */
export const DEFAULT_BASELINE_RUNS = 20;

const targetSchema = z.strictObject({
  /** Expected value of the metric, in its unit. */
  mean: z.number({ error: 'expected a number' }),
  /** Expected run-to-run SD, in the metric's unit. */
  sd: positiveNumber(),
});

export const controlSchema = z.strictObject({
  id: z.string().regex(/^[A-Za-z0-9][A-Za-z0-9._-]*$/, { error: 'expected letters, digits, ".", "_" or "-"' }),
  /** Human name shown in messages; default the id. */
  label: z.string().optional(),
  /** Which results are this control: a sample-id glob (* and ?), a sample-id regular expression, and/or a role. */
  match: z
    .strictObject({
      sampleId: z.string().min(1).optional(),
      sampleIdPattern: z
        .string()
        .min(1)
        .refine(isValidRegExp, { error: 'expected a valid regular expression' })
        .optional(),
      role: z.string().min(1).optional(),
      /** Which measurement of a file holding several is this control's run: its column name; default the file's first (issue 18.3). */
      measurement: z.string().trim().min(1, { error: 'expected a column name' }).optional(),
    })
    .refine(
      (match) => match.sampleId !== undefined || match.sampleIdPattern !== undefined || match.role !== undefined,
      {
        error: 'give sampleId, sampleIdPattern and/or role',
      },
    ),
  /** Declared target and SD per metric; metrics without one use a baseline from runs. */
  targets: z
    .partialRecord(z.enum(METRIC_NAMES, { error: `expected one of ${METRIC_NAMES.join(', ')}` }), targetSchema)
    .default({}),
  /** Runs that establish a baseline (first N in-control runs). Default 20. */
  baselineRuns: wholeNumberAtLeast(2).default(DEFAULT_BASELINE_RUNS),
  /** Runs beyond this many SDs of the provisional baseline are left out of it. Default 3. */
  baselineExcludeBeyondSd: positiveNumber().default(3),
});
export type ControlDefinition = z.output<typeof controlSchema>;

/** True when `pattern` compiles as a JavaScript regular expression (it is matched, never executed as code). */
function isValidRegExp(pattern: string): boolean {
  try {
    new RegExp(pattern);
    return true;
  } catch {
    return false;
  }
}

/** A glob with * (any run) and ? (one character) as an anchored, case-sensitive RegExp. O(pattern length). */
export function globToRegExp(pattern: string): RegExp {
  const escaped = pattern
    .replace(/[.+^${}()|[\]\\]/g, '\\$&')
    .replace(/\*/g, '.*')
    .replace(/\?/g, '.');
  return new RegExp(`^${escaped}$`);
}

/** True when a result with this sample id and role is the given control (every given criterion must match). */
export function isControlMatch(
  control: ControlDefinition,
  sampleId: string | undefined,
  role: string | undefined,
): boolean {
  const { match } = control;
  if (match.sampleId !== undefined && (sampleId === undefined || !globToRegExp(match.sampleId).test(sampleId)))
    return false;
  if (
    match.sampleIdPattern !== undefined &&
    (sampleId === undefined || !new RegExp(match.sampleIdPattern).test(sampleId))
  )
    return false;
  if (match.role !== undefined && match.role !== role) return false;
  return true;
}

/**
 * True when `control` judges this measurement (issue 18.3): the column its `match.measurement` names, or,
 * without one, a result that is no further measurement of its file (a single measurement or the file's first).
 */
export function selectsMeasurement(
  control: ControlDefinition,
  measurement: { readonly column: string; readonly setId?: string } | undefined,
): boolean {
  const named = control.match.measurement;
  if (named === undefined) return measurement?.setId === undefined;
  return measurement !== undefined && measurement.column.trim() === named;
}

/** The first control whose match criteria fit the result, or undefined. O(controls). */
export function findControl(
  controls: readonly ControlDefinition[],
  sampleId: string | undefined,
  role: string | undefined,
): ControlDefinition | undefined {
  return controls.find((control) => isControlMatch(control, sampleId, role));
}

/** The declared target of a control's metric, if any. */
export function declaredTarget(
  control: ControlDefinition,
  metric: MetricName,
): { mean: number; sd: number } | undefined {
  return control.targets[metric];
}
