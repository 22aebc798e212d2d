// Fields every rule shares (id, metric, scope, severity), the severity scale, and the zod helpers
// rule-kind files use so that every config error reads "rules[2].lambda: expected …".
import { z } from 'zod';
import { METRIC_NAMES } from './metrics.js';

export const SEVERITIES = ['info', 'warning', 'critical'] as const;
export type Severity = (typeof SEVERITIES)[number];

/** Numeric rank of a severity (info 0 < warning 1 < critical 2), for routing thresholds. */
export function severityRank(severity: Severity): number {
  return SEVERITIES.indexOf(severity);
}

/** The id used as controlId for rules scoped to the instrument rather than one control. */
export const INSTRUMENT_SCOPE = 'instrument';

/** A finite number in [min, max] (or (min, max] when `exclusiveMin`), with a readable error. */
export function numberBetween(min: number, max: number, options: { exclusiveMin?: boolean } = {}): z.ZodNumber {
  const message = `expected a number between ${min} and ${max}${options.exclusiveMin === true ? ` (above ${min})` : ''}`;
  const base = z.number({ error: message }).max(max, { error: message });
  return options.exclusiveMin === true ? base.gt(min, { error: message }) : base.gte(min, { error: message });
}

/** A finite positive number with a readable error. */
export function positiveNumber(): z.ZodNumber {
  return z.number({ error: 'expected a positive number' }).gt(0, { error: 'expected a positive number' });
}

/** A whole number ≥ min with a readable error. */
export function wholeNumberAtLeast(min: number): z.ZodNumber {
  const message = `expected a whole number of at least ${min}`;
  return z.number({ error: message }).int({ error: message }).gte(min, { error: message });
}

export const scopeSchema = z.union(
  [
    z.literal(INSTRUMENT_SCOPE),
    z.strictObject({ control: z.string().min(1) }),
    z.strictObject({
      controls: z
        .array(z.string().min(1), { error: 'expected a list of control ids' })
        .min(1, { error: 'name at least one control' }),
    }),
  ],
  {
    error: `expected "${INSTRUMENT_SCOPE}", { control: CONTROL_ID } or { controls: [CONTROL_ID, …] }; leave it out to judge every control`,
  },
);
/** Absent: every control. `instrument`: instrument checks. `{ control }` / `{ controls }`: only those controls. */
export type RuleScope = z.output<typeof scopeSchema> | undefined;

/** The shape shared by every rule; each kind file spreads it and adds `kind` and its parameters. */
export const baseRuleShape = {
  /** Unique rule id, used in flags, alerts and the cooldown key. */
  id: z.string({ error: 'expected a rule id (text)' }).regex(/^[A-Za-z0-9][A-Za-z0-9._-]*$/, {
    error: 'expected letters, digits, ".", "_" or "-"',
  }),
  metric: z.enum(METRIC_NAMES, { error: `expected one of ${METRIC_NAMES.join(', ')}` }),
  /** Which results the rule judges; default every control (see RuleScope). */
  scope: scopeSchema.optional(),
  severity: z.enum(SEVERITIES, { error: `expected one of ${SEVERITIES.join(', ')}` }),
  /** Free text shown by `driftlight rules check`. */
  description: z.string().optional(),
};

export interface BaseRule {
  readonly id: string;
  readonly kind: string;
  readonly metric: z.output<typeof baseRuleShape.metric>;
  readonly scope?: RuleScope;
  readonly severity: Severity;
  readonly description?: string | undefined;
}

/** True for a rule scoped to the instrument (judges instrument checks of any result). */
export function isInstrumentScope(scope: RuleScope): scope is typeof INSTRUMENT_SCOPE {
  return scope === INSTRUMENT_SCOPE;
}

/** The control ids a scope names, or undefined when it judges every control (or is the instrument scope). */
export function namedControls(scope: RuleScope): readonly string[] | undefined {
  if (scope === undefined || scope === INSTRUMENT_SCOPE) return undefined;
  return 'control' in scope ? [scope.control] : scope.controls;
}

/** True when a rule with this scope judges the control `controlId` (never the instrument pseudo-control). */
export function scopeJudgesControl(scope: RuleScope, controlId: string): boolean {
  if (scope === INSTRUMENT_SCOPE || controlId === INSTRUMENT_SCOPE) return false;
  const named = namedControls(scope);
  return named === undefined || named.includes(controlId);
}

/** Short text of a scope: "instrument", "every control" or the named ids. */
export function describeScope(scope: RuleScope): string {
  if (scope === INSTRUMENT_SCOPE) return INSTRUMENT_SCOPE;
  return namedControls(scope)?.join(', ') ?? 'every control';
}
